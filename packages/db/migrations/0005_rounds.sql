CREATE TABLE "round_done" (
	"round_id" uuid NOT NULL,
	"text_id" uuid NOT NULL,
	"user_id" uuid NOT NULL,
	"done_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "round_done_round_id_text_id_user_id_pk" PRIMARY KEY("round_id","text_id","user_id")
);
--> statement-breakpoint
CREATE TABLE "round_participants" (
	"round_id" uuid NOT NULL,
	"user_id" uuid NOT NULL,
	CONSTRAINT "round_participants_round_id_user_id_pk" PRIMARY KEY("round_id","user_id")
);
--> statement-breakpoint
CREATE TABLE "round_texts" (
	"round_id" uuid NOT NULL,
	"text_id" uuid NOT NULL,
	"position" integer DEFAULT 0 NOT NULL,
	CONSTRAINT "round_texts_round_id_text_id_pk" PRIMARY KEY("round_id","text_id")
);
--> statement-breakpoint
CREATE TABLE "rounds" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"study_id" uuid NOT NULL,
	"number" integer NOT NULL,
	"name" text NOT NULL,
	"purpose" text DEFAULT '' NOT NULL,
	"unit" text NOT NULL,
	"statistic" text NOT NULL,
	"phase" text DEFAULT 'independent' NOT NULL,
	"codebook_version_id" uuid,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"revealed_at" timestamp with time zone,
	"closed_at" timestamp with time zone,
	CONSTRAINT "rounds_phase_check" CHECK ("rounds"."phase" in ('independent', 'revealed', 'closed'))
);
--> statement-breakpoint
ALTER TABLE "documents" DROP CONSTRAINT "documents_shape_check";--> statement-breakpoint
DROP INDEX "documents_layer_key";--> statement-breakpoint
ALTER TABLE "documents" ADD COLUMN "round_id" uuid;--> statement-breakpoint
ALTER TABLE "round_done" ADD CONSTRAINT "round_done_round_id_rounds_id_fk" FOREIGN KEY ("round_id") REFERENCES "public"."rounds"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "round_done" ADD CONSTRAINT "round_done_text_id_texts_id_fk" FOREIGN KEY ("text_id") REFERENCES "public"."texts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "round_done" ADD CONSTRAINT "round_done_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "round_participants" ADD CONSTRAINT "round_participants_round_id_rounds_id_fk" FOREIGN KEY ("round_id") REFERENCES "public"."rounds"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "round_participants" ADD CONSTRAINT "round_participants_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "round_texts" ADD CONSTRAINT "round_texts_round_id_rounds_id_fk" FOREIGN KEY ("round_id") REFERENCES "public"."rounds"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "round_texts" ADD CONSTRAINT "round_texts_text_id_texts_id_fk" FOREIGN KEY ("text_id") REFERENCES "public"."texts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "rounds" ADD CONSTRAINT "rounds_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "rounds" ADD CONSTRAINT "rounds_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "round_participants_user_idx" ON "round_participants" USING btree ("user_id");--> statement-breakpoint
CREATE INDEX "round_texts_text_idx" ON "round_texts" USING btree ("text_id");--> statement-breakpoint
CREATE UNIQUE INDEX "rounds_study_number_key" ON "rounds" USING btree ("study_id","number");--> statement-breakpoint
ALTER TABLE "documents" ADD CONSTRAINT "documents_round_id_rounds_id_fk" FOREIGN KEY ("round_id") REFERENCES "public"."rounds"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "documents_round_layer_key" ON "documents" USING btree ("round_id","text_id","coder_id") WHERE "documents"."kind" = 'layer' and "documents"."round_id" is not null and "documents"."coder_id" is not null;--> statement-breakpoint
CREATE UNIQUE INDEX "documents_consensus_key" ON "documents" USING btree ("round_id","text_id") WHERE "documents"."kind" = 'layer' and "documents"."coder_id" is null;--> statement-breakpoint
CREATE INDEX "documents_round_idx" ON "documents" USING btree ("round_id");--> statement-breakpoint
CREATE UNIQUE INDEX "documents_layer_key" ON "documents" USING btree ("text_id","coder_id") WHERE "documents"."kind" = 'layer' and "documents"."round_id" is null;--> statement-breakpoint
ALTER TABLE "documents" ADD CONSTRAINT "documents_shape_check" CHECK (("documents"."kind" = 'text' and "documents"."text_id" is not null and "documents"."coder_id" is null and "documents"."round_id" is null)
        or ("documents"."kind" = 'layer' and "documents"."text_id" is not null and ("documents"."coder_id" is not null or "documents"."round_id" is not null))
        or ("documents"."kind" in ('codebook', 'memos') and "documents"."text_id" is null and "documents"."coder_id" is null and "documents"."round_id" is null));