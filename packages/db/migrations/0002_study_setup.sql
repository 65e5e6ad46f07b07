CREATE TABLE "account_links" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"token_hash" text NOT NULL,
	"purpose" text NOT NULL,
	"email" text NOT NULL,
	"study_id" uuid,
	"role" text,
	"user_id" uuid,
	"created_by" uuid,
	"expires_at" timestamp with time zone NOT NULL,
	"used_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "account_links_purpose_check" CHECK ("account_links"."purpose" in ('invite', 'reset')),
	CONSTRAINT "account_links_shape_check" CHECK (("account_links"."purpose" = 'invite' and "account_links"."study_id" is not null and "account_links"."role" is not null)
        or ("account_links"."purpose" = 'reset' and "account_links"."user_id" is not null))
);
--> statement-breakpoint
ALTER TABLE "studies" ADD COLUMN "ethics_note" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "studies" ADD COLUMN "archived_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "account_links" ADD CONSTRAINT "account_links_study_id_studies_id_fk" FOREIGN KEY ("study_id") REFERENCES "public"."studies"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "account_links" ADD CONSTRAINT "account_links_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "account_links" ADD CONSTRAINT "account_links_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "account_links_token_key" ON "account_links" USING btree ("token_hash");--> statement-breakpoint
CREATE INDEX "account_links_study_idx" ON "account_links" USING btree ("study_id");