ALTER TABLE "stock_forms" ADD COLUMN "compound" text;--> statement-breakpoint
ALTER TABLE "reports" ADD COLUMN "stock_form_id" text;