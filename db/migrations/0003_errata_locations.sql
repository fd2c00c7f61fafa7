ALTER TABLE "erratum_board_revisions" DISABLE ROW LEVEL SECURITY;--> statement-breakpoint
DROP TABLE "erratum_board_revisions" CASCADE;--> statement-breakpoint
ALTER TABLE "proposals" DROP CONSTRAINT "proposals_target_check";--> statement-breakpoint
ALTER TABLE "errata" ADD COLUMN "affected" integer[] DEFAULT '{}'::integer[] NOT NULL;--> statement-breakpoint
ALTER TABLE "errata" ADD COLUMN "refdes" text[] DEFAULT '{}'::text[] NOT NULL;--> statement-breakpoint
ALTER TABLE "errata" ADD COLUMN "parts" text[] DEFAULT '{}'::text[] NOT NULL;--> statement-breakpoint
ALTER TABLE "errata" ADD COLUMN "pins" text[] DEFAULT '{}'::text[] NOT NULL;--> statement-breakpoint
CREATE INDEX "errata_affected_idx" ON "errata" USING gin ("affected");--> statement-breakpoint
ALTER TABLE "errata" DROP COLUMN "location";--> statement-breakpoint
ALTER TABLE "proposals" ADD CONSTRAINT "proposals_target_check" CHECK (("proposals"."kind" = 'new_erratum' AND "proposals"."document_id" IS NULL)
        OR ("proposals"."kind" = 'erratum_edit' AND "proposals"."erratum_id" IS NOT NULL)
        OR ("proposals"."kind" = 'document_edit' AND "proposals"."document_id" IS NOT NULL));