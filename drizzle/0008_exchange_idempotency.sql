CREATE TABLE "idempotency_keys" (
	"member_id" text NOT NULL,
	"key" text NOT NULL,
	"request_hash" text NOT NULL,
	"status" integer NOT NULL,
	"body" jsonb,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "idempotency_keys_member_id_key_pk" PRIMARY KEY("member_id","key")
);
--> statement-breakpoint
ALTER TABLE "report_events" ADD COLUMN "actor_name" text;--> statement-breakpoint
ALTER TABLE "reports" ADD COLUMN "fingerprint" text;--> statement-breakpoint
ALTER TABLE "idempotency_keys" ADD CONSTRAINT "idempotency_keys_member_id_users_id_fk" FOREIGN KEY ("member_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "reports_fingerprint_idx" ON "reports" USING btree ("fingerprint");