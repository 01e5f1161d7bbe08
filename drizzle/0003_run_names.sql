ALTER TABLE "runs" ADD COLUMN "name" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "sweeps" ADD COLUMN "name" text DEFAULT '' NOT NULL;