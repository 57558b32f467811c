CREATE TABLE "accounts" (
	"id" text PRIMARY KEY NOT NULL,
	"account_id" text NOT NULL,
	"provider_id" text NOT NULL,
	"user_id" text NOT NULL,
	"access_token" text,
	"refresh_token" text,
	"id_token" text,
	"access_token_expires_at" timestamp with time zone,
	"refresh_token_expires_at" timestamp with time zone,
	"scope" text,
	"password" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "sessions" (
	"id" text PRIMARY KEY NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"token" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"ip_address" text,
	"user_agent" text,
	"user_id" text NOT NULL,
	"impersonated_by" text,
	CONSTRAINT "sessions_token_unique" UNIQUE("token")
);
--> statement-breakpoint
CREATE TABLE "users" (
	"id" text PRIMARY KEY NOT NULL,
	"name" text NOT NULL,
	"email" text NOT NULL,
	"email_verified" boolean DEFAULT false NOT NULL,
	"image" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"role" text DEFAULT 'member' NOT NULL,
	"banned" boolean DEFAULT false,
	"ban_reason" text,
	"ban_expires" timestamp with time zone,
	"is_demo" boolean DEFAULT false NOT NULL,
	CONSTRAINT "users_email_unique" UNIQUE("email")
);
--> statement-breakpoint
CREATE TABLE "verifications" (
	"id" text PRIMARY KEY NOT NULL,
	"identifier" text NOT NULL,
	"value" text NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "catalogue_changes" (
	"id" serial PRIMARY KEY NOT NULL,
	"actor_id" text,
	"entity" text NOT NULL,
	"entity_key" text NOT NULL,
	"action" text NOT NULL,
	"before" jsonb,
	"after" jsonb,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "club_settings" (
	"id" integer PRIMARY KEY DEFAULT 1 NOT NULL,
	"name" text DEFAULT 'Tanklore club' NOT NULL,
	"confidence_level" integer DEFAULT 95 NOT NULL,
	"min_reports" integer DEFAULT 5 NOT NULL,
	"default_volume_unit" text DEFAULT 'L' NOT NULL,
	"default_temperature_unit" text DEFAULT 'C' NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "club_settings_single_row" CHECK ("club_settings"."id" = 1),
	CONSTRAINT "club_settings_confidence" CHECK ("club_settings"."confidence_level" in (80, 90, 95, 99))
);
--> statement-breakpoint
CREATE TABLE "role_changes" (
	"id" serial PRIMARY KEY NOT NULL,
	"user_id" text NOT NULL,
	"actor_id" text,
	"from_role" text NOT NULL,
	"to_role" text NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "agents" (
	"slug" text PRIMARY KEY NOT NULL,
	"name" text NOT NULL,
	"unit" text NOT NULL,
	"band_edges" jsonb NOT NULL,
	"plausible_ceiling" double precision NOT NULL,
	"redose_hours" integer,
	"watch_days" integer DEFAULT 7 NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	"sort_order" integer DEFAULT 0 NOT NULL,
	"hidden" boolean DEFAULT false NOT NULL
);
--> statement-breakpoint
CREATE TABLE "conditions" (
	"slug" text PRIMARY KEY NOT NULL,
	"name" text NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	"sort_order" integer DEFAULT 0 NOT NULL,
	"hidden" boolean DEFAULT false NOT NULL
);
--> statement-breakpoint
CREATE TABLE "species" (
	"id" text PRIMARY KEY NOT NULL,
	"scientific_name" text NOT NULL,
	"common_name" text NOT NULL,
	"group_slug" text NOT NULL,
	"hidden" boolean DEFAULT false NOT NULL,
	"merged_into" text,
	CONSTRAINT "species_scientificName_unique" UNIQUE("scientific_name")
);
--> statement-breakpoint
CREATE TABLE "species_groups" (
	"slug" text PRIMARY KEY NOT NULL,
	"name" text NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	"sort_order" integer DEFAULT 0 NOT NULL,
	"hidden" boolean DEFAULT false NOT NULL
);
--> statement-breakpoint
CREATE TABLE "stock_forms" (
	"id" text PRIMARY KEY NOT NULL,
	"agent_slug" text NOT NULL,
	"label" text NOT NULL,
	"percent" double precision NOT NULL,
	"basis" text NOT NULL,
	"density_g_per_ml" double precision,
	"active_fraction" double precision DEFAULT 1 NOT NULL,
	"sort_order" integer DEFAULT 0 NOT NULL,
	"hidden" boolean DEFAULT false NOT NULL
);
--> statement-breakpoint
CREATE TABLE "course_entries" (
	"id" serial PRIMARY KEY NOT NULL,
	"report_id" text NOT NULL,
	"kind" text NOT NULL,
	"at" timestamp with time zone NOT NULL,
	"amount_ml" double precision,
	"text" text,
	"photo_id" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "photos" (
	"id" text PRIMARY KEY NOT NULL,
	"report_id" text NOT NULL,
	"uploader_id" text,
	"stage" text DEFAULT 'during' NOT NULL,
	"width" integer NOT NULL,
	"height" integer NOT NULL,
	"bytes" integer NOT NULL,
	"full_key" text NOT NULL,
	"thumb_key" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "reminders" (
	"id" serial PRIMARY KEY NOT NULL,
	"report_id" text NOT NULL,
	"user_id" text NOT NULL,
	"kind" text NOT NULL,
	"due_at" timestamp with time zone NOT NULL,
	"sent_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "report_events" (
	"id" serial PRIMARY KEY NOT NULL,
	"report_id" text NOT NULL,
	"actor_id" text,
	"action" text NOT NULL,
	"from_status" text,
	"to_status" text,
	"note" text,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "reports" (
	"id" text PRIMARY KEY NOT NULL,
	"author_id" text NOT NULL,
	"status" text DEFAULT 'draft' NOT NULL,
	"source" text DEFAULT 'member' NOT NULL,
	"species_id" text,
	"species_other" text,
	"group_slug" text,
	"fish_count" integer,
	"size_class" text,
	"condition_slug" text,
	"started_on" date,
	"water_volume" double precision,
	"water_volume_unit" text,
	"volume_l" double precision,
	"temperature" double precision,
	"temperature_unit" text,
	"temperature_c" double precision,
	"ph" double precision,
	"setting" text,
	"agent_slug" text,
	"stock_percent" double precision,
	"stock_basis" text,
	"stock_density_g_per_ml" double precision,
	"stock_active_fraction" double precision,
	"amount_ml" double precision,
	"stated_concentration" double precision,
	"doses" integer,
	"interval_hours" double precision,
	"other_treatments" text,
	"fish_lost" integer,
	"loss_cause" text,
	"distress" text,
	"condition_outcome" text,
	"observed_days_after" integer,
	"notes" text,
	"show_name" boolean DEFAULT false NOT NULL,
	"concentration" double precision,
	"flags" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"completeness" double precision,
	"course_open" boolean DEFAULT false NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"submitted_at" timestamp with time zone,
	"decided_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "accounts" ADD CONSTRAINT "accounts_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sessions" ADD CONSTRAINT "sessions_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "catalogue_changes" ADD CONSTRAINT "catalogue_changes_actor_id_users_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "role_changes" ADD CONSTRAINT "role_changes_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "role_changes" ADD CONSTRAINT "role_changes_actor_id_users_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "species" ADD CONSTRAINT "species_group_slug_species_groups_slug_fk" FOREIGN KEY ("group_slug") REFERENCES "public"."species_groups"("slug") ON DELETE no action ON UPDATE cascade;--> statement-breakpoint
ALTER TABLE "stock_forms" ADD CONSTRAINT "stock_forms_agent_slug_agents_slug_fk" FOREIGN KEY ("agent_slug") REFERENCES "public"."agents"("slug") ON DELETE no action ON UPDATE cascade;--> statement-breakpoint
ALTER TABLE "course_entries" ADD CONSTRAINT "course_entries_report_id_reports_id_fk" FOREIGN KEY ("report_id") REFERENCES "public"."reports"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "photos" ADD CONSTRAINT "photos_report_id_reports_id_fk" FOREIGN KEY ("report_id") REFERENCES "public"."reports"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "photos" ADD CONSTRAINT "photos_uploader_id_users_id_fk" FOREIGN KEY ("uploader_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reminders" ADD CONSTRAINT "reminders_report_id_reports_id_fk" FOREIGN KEY ("report_id") REFERENCES "public"."reports"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reminders" ADD CONSTRAINT "reminders_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "report_events" ADD CONSTRAINT "report_events_report_id_reports_id_fk" FOREIGN KEY ("report_id") REFERENCES "public"."reports"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "report_events" ADD CONSTRAINT "report_events_actor_id_users_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reports" ADD CONSTRAINT "reports_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reports" ADD CONSTRAINT "reports_species_id_species_id_fk" FOREIGN KEY ("species_id") REFERENCES "public"."species"("id") ON DELETE no action ON UPDATE cascade;--> statement-breakpoint
ALTER TABLE "reports" ADD CONSTRAINT "reports_group_slug_species_groups_slug_fk" FOREIGN KEY ("group_slug") REFERENCES "public"."species_groups"("slug") ON DELETE no action ON UPDATE cascade;--> statement-breakpoint
ALTER TABLE "reports" ADD CONSTRAINT "reports_condition_slug_conditions_slug_fk" FOREIGN KEY ("condition_slug") REFERENCES "public"."conditions"("slug") ON DELETE no action ON UPDATE cascade;--> statement-breakpoint
ALTER TABLE "reports" ADD CONSTRAINT "reports_agent_slug_agents_slug_fk" FOREIGN KEY ("agent_slug") REFERENCES "public"."agents"("slug") ON DELETE no action ON UPDATE cascade;--> statement-breakpoint
CREATE INDEX "accounts_user_id_idx" ON "accounts" USING btree ("user_id");--> statement-breakpoint
CREATE INDEX "sessions_user_id_idx" ON "sessions" USING btree ("user_id");--> statement-breakpoint
CREATE INDEX "verifications_identifier_idx" ON "verifications" USING btree ("identifier");--> statement-breakpoint
CREATE INDEX "species_group_idx" ON "species" USING btree ("group_slug");--> statement-breakpoint
CREATE INDEX "stock_forms_agent_idx" ON "stock_forms" USING btree ("agent_slug");--> statement-breakpoint
CREATE INDEX "course_entries_report_idx" ON "course_entries" USING btree ("report_id");--> statement-breakpoint
CREATE INDEX "photos_report_idx" ON "photos" USING btree ("report_id");--> statement-breakpoint
CREATE INDEX "reminders_due_idx" ON "reminders" USING btree ("due_at");--> statement-breakpoint
CREATE INDEX "report_events_report_idx" ON "report_events" USING btree ("report_id");--> statement-breakpoint
CREATE INDEX "reports_author_idx" ON "reports" USING btree ("author_id");--> statement-breakpoint
CREATE INDEX "reports_status_idx" ON "reports" USING btree ("status");--> statement-breakpoint
CREATE INDEX "reports_evidence_idx" ON "reports" USING btree ("agent_slug","group_slug","status");