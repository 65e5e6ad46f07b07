CREATE TABLE "pseudonym_key_exports" (
	"study_id" uuid PRIMARY KEY NOT NULL,
	"exported_by" uuid,
	"exported_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "pseudonyms" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"study_id" uuid NOT NULL,
	"kind" text NOT NULL,
	"original" text NOT NULL,
	"pseudonym" text NOT NULL,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "retired_documents" (
	"id" uuid PRIMARY KEY NOT NULL,
	"study_id" uuid NOT NULL,
	"text_id" uuid NOT NULL,
	"replaced_by" uuid NOT NULL,
	"retired_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "pseudonym_key_exports" ADD CONSTRAINT "pseudonym_key_exports_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "pseudonym_key_exports" ADD CONSTRAINT "pseudonym_key_exports_exported_by_users_id_fk" FOREIGN KEY ("exported_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "pseudonyms" ADD CONSTRAINT "pseudonyms_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "pseudonyms" ADD CONSTRAINT "pseudonyms_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "retired_documents" ADD CONSTRAINT "retired_documents_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "retired_documents" ADD CONSTRAINT "retired_documents_text_id_texts_id_fk" FOREIGN KEY ("text_id") REFERENCES "public"."texts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "pseudonyms_study_original_key" ON "pseudonyms" USING btree ("study_id","original");--> statement-breakpoint
CREATE INDEX "pseudonyms_study_idx" ON "pseudonyms" USING btree ("study_id");--> statement-breakpoint
CREATE INDEX "retired_documents_text_idx" ON "retired_documents" USING btree ("text_id");