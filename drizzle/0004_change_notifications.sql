-- Every committed change to the app's tables sends one notification on the channel
-- "tilthmark_change" (NOTIFY is delivered at commit, and identical notifications of one transaction
-- are folded into one). Server workers listen and drop the responses they cached before it
-- (app/.server/change-feed.ts, app/.server/response-cache.ts). api_key is left out: using a key
-- records its last use, and that must not empty every cache.
CREATE OR REPLACE FUNCTION "tilthmark_notify_change"() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  PERFORM pg_notify('tilthmark_change', '');
  RETURN NULL;
END;
$$;
--> statement-breakpoint
DO $$
DECLARE
  t text;
BEGIN
  FOR t IN SELECT tablename FROM pg_tables WHERE schemaname = 'public' AND tablename <> 'api_key' LOOP
    EXECUTE format(
      'CREATE TRIGGER "tilthmark_change" AFTER INSERT OR UPDATE OR DELETE OR TRUNCATE ON %I FOR EACH STATEMENT EXECUTE FUNCTION "tilthmark_notify_change"()',
      t
    );
  END LOOP;
END;
$$;
