CREATE TABLE "evidence_summaries" (
	"group_slug" text NOT NULL,
	"agent_slug" text NOT NULL,
	"condition_slug" text DEFAULT '' NOT NULL,
	"method_version" text NOT NULL,
	"confidence_level" integer NOT NULL,
	"reports" integer NOT NULL,
	"summary" jsonb NOT NULL,
	"detail" jsonb NOT NULL,
	"computed_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "evidence_summaries_agent_slug_condition_slug_group_slug_pk" PRIMARY KEY("agent_slug","condition_slug","group_slug")
);
