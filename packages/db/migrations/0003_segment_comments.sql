CREATE TABLE "segment_comments" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"study_id" uuid NOT NULL,
	"text_id" uuid NOT NULL,
	"layer_doc_id" uuid NOT NULL,
	"segment_id" text NOT NULL,
	"parent_id" uuid,
	"author_id" uuid,
	"body" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"resolved_at" timestamp with time zone,
	"resolved_by" uuid
);
--> statement-breakpoint
ALTER TABLE "segment_comments" ADD CONSTRAINT "segment_comments_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "segment_comments" ADD CONSTRAINT "segment_comments_text_id_texts_id_fk" FOREIGN KEY ("text_id") REFERENCES "public"."texts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "segment_comments" ADD CONSTRAINT "segment_comments_layer_doc_id_documents_id_fk" FOREIGN KEY ("layer_doc_id") REFERENCES "public"."documents"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "segment_comments" ADD CONSTRAINT "segment_comments_parent_id_segment_comments_id_fk" FOREIGN KEY ("parent_id") REFERENCES "public"."segment_comments"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "segment_comments" ADD CONSTRAINT "segment_comments_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "segment_comments" ADD CONSTRAINT "segment_comments_resolved_by_users_id_fk" FOREIGN KEY ("resolved_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "segment_comments_text_idx" ON "segment_comments" USING btree ("text_id");--> statement-breakpoint
CREATE INDEX "segment_comments_segment_idx" ON "segment_comments" USING btree ("layer_doc_id","segment_id");--> statement-breakpoint
CREATE INDEX "segment_comments_parent_idx" ON "segment_comments" USING btree ("parent_id");