ALTER TABLE "captured_mail" ADD COLUMN "workspace_id" text;--> statement-breakpoint
ALTER TABLE "captured_mail" ADD COLUMN "kind" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "sign_in_attempts" ADD COLUMN "client" text DEFAULT '' NOT NULL;--> statement-breakpoint
CREATE INDEX "captured_mail_workspace_idx" ON "captured_mail" USING btree ("workspace_id","received_at");--> statement-breakpoint
CREATE INDEX "sign_in_attempts_client_idx" ON "sign_in_attempts" USING btree ("client","created_at");