ALTER TABLE "segments" ADD COLUMN "turn_index" integer;--> statement-breakpoint
ALTER TABLE "segments" ADD COLUMN "speaker" text;--> statement-breakpoint
ALTER TABLE "segments" ADD COLUMN "round" integer;