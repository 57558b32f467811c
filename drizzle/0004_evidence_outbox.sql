CREATE TABLE "evidence_outbox" (
	"id" serial PRIMARY KEY NOT NULL,
	"group_slug" text NOT NULL,
	"agent_slug" text NOT NULL,
	"enqueued_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE INDEX "evidence_outbox_pair_idx" ON "evidence_outbox" USING btree ("group_slug","agent_slug");