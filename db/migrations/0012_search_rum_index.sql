-- Custom SQL migration file, put your code below! --
-- A RUM index over the search vector with updated_at attached to every posting: a query that
-- matches a few thousand items reads its newest matches in the index, without fetching and
-- checking every matching row (see api/search/postgres.ts). RUM is an extension (Debian's
-- postgresql-15-rum) that only a superuser may create: the embedded server and the tests create
-- it before migrating when it is installed; on another server an administrator runs
-- CREATE EXTENSION rum. Without it the GIN index serves, slower for mid-frequency words.
DO $$
BEGIN
  IF NOT EXISTS (SELECT 1 FROM pg_extension WHERE extname = 'rum')
     AND EXISTS (SELECT 1 FROM pg_available_extensions WHERE name = 'rum')
     AND (SELECT rolsuper FROM pg_roles WHERE rolname = current_user) THEN
    CREATE EXTENSION rum;
  END IF;
  IF EXISTS (SELECT 1 FROM pg_extension WHERE extname = 'rum') THEN
    EXECUTE $sql$CREATE INDEX IF NOT EXISTS search_docs_tsv_rum_idx ON search_docs
      USING rum (tsv rum_tsvector_addon_ops, updated_at) WITH (attach = 'updated_at', to = 'tsv')$sql$;
  END IF;
END
$$;
