CREATE TABLE "projection_state" (
	"doc_id" uuid PRIMARY KEY NOT NULL,
	"seq" bigint NOT NULL,
	"text_seq" bigint,
	"projected_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "projection_state" ADD CONSTRAINT "projection_state_doc_id_documents_id_fk" FOREIGN KEY ("doc_id") REFERENCES "public"."documents"("id") ON DELETE cascade ON UPDATE no action;