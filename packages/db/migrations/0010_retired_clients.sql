ALTER TABLE "retired_documents" ALTER COLUMN "text_id" DROP NOT NULL;--> statement-breakpoint
ALTER TABLE "retired_documents" ADD COLUMN "kind" text DEFAULT 'text' NOT NULL;--> statement-breakpoint
ALTER TABLE "retired_documents" ADD COLUMN "clients" jsonb DEFAULT '[]'::jsonb NOT NULL;--> statement-breakpoint
CREATE INDEX "retired_documents_replaced_by_idx" ON "retired_documents" USING btree ("replaced_by");