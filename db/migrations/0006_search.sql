CREATE TABLE "search_docs" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "search_docs_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"kind" text NOT NULL,
	"ref_id" integer NOT NULL,
	"project_id" integer,
	"visible" boolean NOT NULL,
	"title" text NOT NULL,
	"body" text DEFAULT '' NOT NULL,
	"url" text NOT NULL,
	"project_slug" text,
	"project_title" text,
	"category" text,
	"severity" text,
	"status" text,
	"tags" text[] DEFAULT '{}'::text[] NOT NULL,
	"parts" text[] DEFAULT '{}'::text[] NOT NULL,
	"pins" text[] DEFAULT '{}'::text[] NOT NULL,
	"tsv" "tsvector" NOT NULL,
	"updated_at" timestamp with time zone NOT NULL
);
--> statement-breakpoint
CREATE TABLE "search_outbox" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "search_outbox_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"kind" text NOT NULL,
	"ref_id" integer NOT NULL,
	"queued_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "search_terms" (
	"term" text PRIMARY KEY NOT NULL,
	"docs" integer DEFAULT 0 NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX "search_docs_ref_key" ON "search_docs" USING btree ("kind","ref_id");--> statement-breakpoint
CREATE INDEX "search_docs_tsv_idx" ON "search_docs" USING gin ("tsv");--> statement-breakpoint
CREATE INDEX "search_docs_updated_idx" ON "search_docs" USING btree ("updated_at");--> statement-breakpoint
CREATE INDEX "search_docs_project_idx" ON "search_docs" USING btree ("project_id");