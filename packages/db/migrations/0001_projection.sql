CREATE TABLE "attributes" (
	"study_id" uuid NOT NULL,
	"id" text NOT NULL,
	"name" text NOT NULL,
	"type" text NOT NULL,
	"choices" jsonb,
	CONSTRAINT "attributes_study_id_id_pk" PRIMARY KEY("study_id","id")
);
--> statement-breakpoint
CREATE TABLE "case_texts" (
	"study_id" uuid NOT NULL,
	"case_id" text NOT NULL,
	"text_id" text NOT NULL,
	CONSTRAINT "case_texts_study_id_case_id_text_id_pk" PRIMARY KEY("study_id","case_id","text_id")
);
--> statement-breakpoint
CREATE TABLE "case_values" (
	"study_id" uuid NOT NULL,
	"case_id" text NOT NULL,
	"attribute_id" text NOT NULL,
	"value" jsonb,
	CONSTRAINT "case_values_study_id_case_id_attribute_id_pk" PRIMARY KEY("study_id","case_id","attribute_id")
);
--> statement-breakpoint
CREATE TABLE "cases" (
	"study_id" uuid NOT NULL,
	"id" text NOT NULL,
	"name" text NOT NULL,
	"kind" text NOT NULL,
	CONSTRAINT "cases_study_id_id_pk" PRIMARY KEY("study_id","id")
);
--> statement-breakpoint
CREATE TABLE "codes" (
	"study_id" uuid NOT NULL,
	"id" text NOT NULL,
	"label" text NOT NULL,
	"parent_id" text,
	"status" text NOT NULL,
	"type" text NOT NULL,
	"brief_definition" text NOT NULL,
	"full_definition" text NOT NULL,
	"inclusion" text NOT NULL,
	"exclusion" text NOT NULL,
	"colour" text NOT NULL,
	"merged_into" text,
	"in_vivo" boolean NOT NULL,
	"created_at" timestamp with time zone NOT NULL,
	CONSTRAINT "codes_study_id_id_pk" PRIMARY KEY("study_id","id")
);
--> statement-breakpoint
CREATE TABLE "memos" (
	"study_id" uuid NOT NULL,
	"id" text NOT NULL,
	"author" text NOT NULL,
	"kind" text NOT NULL,
	"attached_kind" text NOT NULL,
	"attached_ref" text,
	"segment_id" text,
	"title" text NOT NULL,
	"body" text NOT NULL,
	"created_at" timestamp with time zone NOT NULL,
	"updated_at" timestamp with time zone NOT NULL,
	CONSTRAINT "memos_study_id_id_pk" PRIMARY KEY("study_id","id")
);
--> statement-breakpoint
CREATE TABLE "segments" (
	"layer_doc_id" uuid NOT NULL,
	"id" text NOT NULL,
	"study_id" uuid NOT NULL,
	"text_id" uuid NOT NULL,
	"coder_id" uuid,
	"code_id" text NOT NULL,
	"start" integer NOT NULL,
	"end" integer NOT NULL,
	"quote" text NOT NULL,
	"orphaned" boolean NOT NULL,
	"note" text,
	"created_at" timestamp with time zone NOT NULL,
	CONSTRAINT "segments_layer_doc_id_id_pk" PRIMARY KEY("layer_doc_id","id")
);
--> statement-breakpoint
ALTER TABLE "attributes" ADD CONSTRAINT "attributes_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "case_texts" ADD CONSTRAINT "case_texts_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "case_values" ADD CONSTRAINT "case_values_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "cases" ADD CONSTRAINT "cases_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "codes" ADD CONSTRAINT "codes_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "memos" ADD CONSTRAINT "memos_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "segments" ADD CONSTRAINT "segments_layer_doc_id_documents_id_fk" FOREIGN KEY ("layer_doc_id") REFERENCES "public"."documents"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "segments" ADD CONSTRAINT "segments_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "segments" ADD CONSTRAINT "segments_text_id_texts_id_fk" FOREIGN KEY ("text_id") REFERENCES "public"."texts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "segments" ADD CONSTRAINT "segments_coder_id_users_id_fk" FOREIGN KEY ("coder_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "case_texts_text_idx" ON "case_texts" USING btree ("text_id");--> statement-breakpoint
CREATE INDEX "memos_attached_idx" ON "memos" USING btree ("study_id","attached_kind","attached_ref");--> statement-breakpoint
CREATE INDEX "segments_text_idx" ON "segments" USING btree ("text_id");--> statement-breakpoint
CREATE INDEX "segments_study_code_idx" ON "segments" USING btree ("study_id","code_id");