-- Revisions, review verdicts and audit events are records: once written they are never changed or
-- removed, whatever code talks to the database. These triggers make PostgreSQL itself refuse it.
CREATE FUNCTION "reject_record_change"() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION 'rows of % are immutable records: % is not allowed', TG_TABLE_NAME, TG_OP
    USING ERRCODE = 'integrity_constraint_violation',
          HINT = 'Write a new row instead (a new revision, a new verdict, a new audit event).';
END;
$$;
--> statement-breakpoint
CREATE TRIGGER "revisions_immutable" BEFORE UPDATE OR DELETE ON "revisions"
  FOR EACH ROW EXECUTE FUNCTION "reject_record_change"();
--> statement-breakpoint
CREATE TRIGGER "revisions_no_truncate" BEFORE TRUNCATE ON "revisions"
  FOR EACH STATEMENT EXECUTE FUNCTION "reject_record_change"();
--> statement-breakpoint
CREATE TRIGGER "reviews_immutable" BEFORE UPDATE OR DELETE ON "reviews"
  FOR EACH ROW EXECUTE FUNCTION "reject_record_change"();
--> statement-breakpoint
CREATE TRIGGER "reviews_no_truncate" BEFORE TRUNCATE ON "reviews"
  FOR EACH STATEMENT EXECUTE FUNCTION "reject_record_change"();
--> statement-breakpoint
CREATE TRIGGER "audit_events_immutable" BEFORE UPDATE OR DELETE ON "audit_events"
  FOR EACH ROW EXECUTE FUNCTION "reject_record_change"();
--> statement-breakpoint
CREATE TRIGGER "audit_events_no_truncate" BEFORE TRUNCATE ON "audit_events"
  FOR EACH STATEMENT EXECUTE FUNCTION "reject_record_change"();
--> statement-breakpoint
-- A dataset row is addressed by the SHA-256 of its bytes; its bytes can never change either.
CREATE FUNCTION "reject_dataset_bytes_change"() RETURNS trigger
LANGUAGE plpgsql AS $$
BEGIN
  IF NEW."bytes" IS DISTINCT FROM OLD."bytes" OR NEW."id" IS DISTINCT FROM OLD."id" THEN
    RAISE EXCEPTION 'a dataset is addressed by the hash of its bytes: its bytes and id cannot change'
      USING ERRCODE = 'integrity_constraint_violation';
  END IF;
  RETURN NEW;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER "datasets_bytes_immutable" BEFORE UPDATE ON "datasets"
  FOR EACH ROW EXECUTE FUNCTION "reject_dataset_bytes_change"();
