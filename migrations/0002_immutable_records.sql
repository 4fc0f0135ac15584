-- Records that are evidence for a safety review never change once written: revisions and the audit
-- log refuse UPDATE, DELETE and TRUNCATE, and a review refuses any change once it has been decided.
CREATE FUNCTION ringwell_refuse_change() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION 'rows of % are immutable (% refused)', TG_TABLE_NAME, TG_OP
    USING ERRCODE = 'integrity_constraint_violation';
END;
$$;--> statement-breakpoint
CREATE TRIGGER revisions_immutable BEFORE UPDATE OR DELETE ON "revisions"
  FOR EACH ROW EXECUTE FUNCTION ringwell_refuse_change();--> statement-breakpoint
CREATE TRIGGER revisions_no_truncate BEFORE TRUNCATE ON "revisions"
  FOR EACH STATEMENT EXECUTE FUNCTION ringwell_refuse_change();--> statement-breakpoint
CREATE TRIGGER audit_log_append_only BEFORE UPDATE OR DELETE ON "audit_log"
  FOR EACH ROW EXECUTE FUNCTION ringwell_refuse_change();--> statement-breakpoint
CREATE TRIGGER audit_log_no_truncate BEFORE TRUNCATE ON "audit_log"
  FOR EACH STATEMENT EXECUTE FUNCTION ringwell_refuse_change();--> statement-breakpoint
CREATE FUNCTION ringwell_refuse_decided_review_change() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF OLD.state <> 'requested' THEN
    RAISE EXCEPTION 'review % was decided (%) and cannot change', OLD.id, OLD.state
      USING ERRCODE = 'integrity_constraint_violation';
  END IF;
  IF TG_OP = 'DELETE' THEN
    RAISE EXCEPTION 'reviews are never deleted' USING ERRCODE = 'integrity_constraint_violation';
  END IF;
  RETURN NEW;
END;
$$;--> statement-breakpoint
CREATE TRIGGER reviews_decided_immutable BEFORE UPDATE OR DELETE ON "reviews"
  FOR EACH ROW EXECUTE FUNCTION ringwell_refuse_decided_review_change();
