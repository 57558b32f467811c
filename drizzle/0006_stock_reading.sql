ALTER TABLE "club_settings" ADD COLUMN "first_dose_fraction" double precision DEFAULT 0.5 NOT NULL;--> statement-breakpoint
ALTER TABLE "stock_forms" ADD COLUMN "compound" text;--> statement-breakpoint
ALTER TABLE "reports" ADD COLUMN "stock_form_id" text;