CREATE TABLE "supervision_settings" (
	"study_id" uuid PRIMARY KEY NOT NULL,
	"tolerance_words" integer DEFAULT 2 NOT NULL,
	"drift_threshold" real DEFAULT 0.1 NOT NULL
);
--> statement-breakpoint
CREATE TABLE "text_assignments" (
	"text_id" uuid NOT NULL,
	"user_id" uuid NOT NULL,
	"study_id" uuid NOT NULL,
	"assigned_by" uuid,
	"assigned_at" timestamp with time zone DEFAULT now() NOT NULL,
	"review_state" text DEFAULT 'assigned' NOT NULL,
	"review_note" text DEFAULT '' NOT NULL,
	"reviewed_by" uuid,
	"reviewed_at" timestamp with time zone,
	"comparison_shared" boolean DEFAULT false NOT NULL,
	CONSTRAINT "text_assignments_text_id_user_id_pk" PRIMARY KEY("text_id","user_id"),
	CONSTRAINT "text_assignments_state_check" CHECK ("text_assignments"."review_state" in ('assigned', 'returned', 'accepted'))
);
--> statement-breakpoint
CREATE TABLE "text_references" (
	"text_id" uuid PRIMARY KEY NOT NULL,
	"layer_doc_id" uuid NOT NULL,
	"chosen_by" uuid,
	"chosen_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "supervision_settings" ADD CONSTRAINT "supervision_settings_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "text_assignments" ADD CONSTRAINT "text_assignments_text_id_texts_id_fk" FOREIGN KEY ("text_id") REFERENCES "public"."texts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "text_assignments" ADD CONSTRAINT "text_assignments_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "text_assignments" ADD CONSTRAINT "text_assignments_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "text_assignments" ADD CONSTRAINT "text_assignments_assigned_by_users_id_fk" FOREIGN KEY ("assigned_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "text_assignments" ADD CONSTRAINT "text_assignments_reviewed_by_users_id_fk" FOREIGN KEY ("reviewed_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "text_references" ADD CONSTRAINT "text_references_text_id_texts_id_fk" FOREIGN KEY ("text_id") REFERENCES "public"."texts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "text_references" ADD CONSTRAINT "text_references_layer_doc_id_documents_id_fk" FOREIGN KEY ("layer_doc_id") REFERENCES "public"."documents"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "text_references" ADD CONSTRAINT "text_references_chosen_by_users_id_fk" FOREIGN KEY ("chosen_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "text_assignments_user_idx" ON "text_assignments" USING btree ("user_id");--> statement-breakpoint
CREATE INDEX "text_assignments_study_idx" ON "text_assignments" USING btree ("study_id");