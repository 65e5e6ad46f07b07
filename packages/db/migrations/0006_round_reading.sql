CREATE TABLE "round_reading" (
	"round_id" uuid NOT NULL,
	"text_id" uuid NOT NULL,
	"user_id" uuid NOT NULL,
	"words_read" integer DEFAULT 0 NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "round_reading_round_id_text_id_user_id_pk" PRIMARY KEY("round_id","text_id","user_id")
);
--> statement-breakpoint
ALTER TABLE "round_reading" ADD CONSTRAINT "round_reading_round_id_rounds_id_fk" FOREIGN KEY ("round_id") REFERENCES "public"."rounds"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "round_reading" ADD CONSTRAINT "round_reading_text_id_texts_id_fk" FOREIGN KEY ("text_id") REFERENCES "public"."texts"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "round_reading" ADD CONSTRAINT "round_reading_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;