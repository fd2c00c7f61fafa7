ALTER TABLE "search_docs" ADD COLUMN "title_tsv" "tsvector" NOT NULL;--> statement-breakpoint
CREATE INDEX "search_docs_title_tsv_idx" ON "search_docs" USING gin ("title_tsv");