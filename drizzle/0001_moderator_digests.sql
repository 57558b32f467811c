CREATE TABLE "moderator_digests" (
	"user_id" text PRIMARY KEY NOT NULL,
	"last_sent_at" timestamp with time zone NOT NULL,
	"covered_until" timestamp with time zone NOT NULL
);
--> statement-breakpoint
ALTER TABLE "moderator_digests" ADD CONSTRAINT "moderator_digests_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;