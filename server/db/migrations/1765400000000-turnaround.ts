import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Turnaround and quality figures. `study_turnaround` holds one narrow row per study with the times
 * the chief's figures are made of, kept by statement-level triggers in the same transaction as the
 * change that moves them (so the figures never lag and no writer can forget them):
 * - `started_at`: procedure end, else procedure start, else when the record was opened (`start_basis`
 *   says which), so a study is never left out of the figures;
 * - `physician_id`: who signed the first version, else the study's operator (who owns the signature);
 * - `signed_at`: the first signature; `coded_at`: the first completed code review; `delivered_at`: the
 *   first delivery of a signed version to the EHR. A step not yet taken stays NULL: its interval is open.
 * - quality counts of the version in force, taken from what was signed (the record's vessels, the
 *   physiology core's analysis and the thresholds the report was judged by).
 * `overdue_notice` records the one notice sent for a study that passed its signature target unsigned;
 * the row and the mail job are written in one transaction, and the key makes a second one impossible.
 */
export class Turnaround1765400000000 implements MigrationInterface {
  name = 'Turnaround1765400000000';

  async up(db: QueryRunner): Promise<void> {
    await db.query(`
      CREATE TABLE study_turnaround (
        study_id uuid PRIMARY KEY REFERENCES study (id) ON DELETE CASCADE,
        started_at timestamptz NOT NULL,
        start_basis text NOT NULL CHECK (start_basis IN ('procedure-end', 'procedure-start', 'opened')),
        physician_id uuid NULL REFERENCES app_user (id) ON DELETE SET NULL,
        signed_at timestamptz NULL,
        coded_at timestamptz NULL,
        delivered_at timestamptz NULL,
        endotype text NULL,
        vessels smallint NOT NULL DEFAULT 0,
        warned_vessels smallint NOT NULL DEFAULT 0,
        pressure_vessels smallint NOT NULL DEFAULT 0,
        drift_vessels smallint NOT NULL DEFAULT 0,
        drift_outside_vessels smallint NOT NULL DEFAULT 0,
        -- The drift band of each checked vessel (width_bucket over the edges in shared/turnaround/figures.ts).
        drift_bins smallint[] NOT NULL DEFAULT '{}',
        thermo_vessels smallint NOT NULL DEFAULT 0,
        thermo_complete_vessels smallint NOT NULL DEFAULT 0
      )`);
    // The figures read a date range of started_at: the index carries every column they need, so a
    // range is read in order from the index alone (index-only scan) however the rows' updates have
    // scattered them over the table. The overdue list and notices read the unsigned ones.
    await db.query(`
      CREATE INDEX study_turnaround_started_idx ON study_turnaround (started_at)
      INCLUDE (physician_id, start_basis, signed_at, coded_at, delivered_at, endotype, vessels, warned_vessels,
               pressure_vessels, drift_vessels, drift_outside_vessels, drift_bins, thermo_vessels, thermo_complete_vessels)`);
    await db.query(`CREATE INDEX study_turnaround_unsigned_idx ON study_turnaround (started_at) WHERE signed_at IS NULL`);

    await db.query(`
      CREATE FUNCTION study_turnaround_start(ended timestamptz, started timestamptz, created timestamptz) RETURNS timestamptz
      LANGUAGE sql IMMUTABLE AS $$ SELECT COALESCE(ended, started, created) $$`);
    await db.query(`
      CREATE FUNCTION study_turnaround_basis(ended timestamptz, started timestamptz) RETURNS text
      LANGUAGE sql IMMUTABLE AS $$
        SELECT CASE WHEN ended IS NOT NULL THEN 'procedure-end' WHEN started IS NOT NULL THEN 'procedure-start' ELSE 'opened' END
      $$`);

    await db.query(`
      CREATE FUNCTION study_turnaround_on_study_insert() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        INSERT INTO study_turnaround (study_id, started_at, start_basis, physician_id)
        SELECT n.id, study_turnaround_start(n.procedure_ended_at, n.procedure_started_at, n.created_at),
               study_turnaround_basis(n.procedure_ended_at, n.procedure_started_at), n.operator_id
        FROM inserted n
        ON CONFLICT (study_id) DO NOTHING;
        RETURN NULL;
      END $$`);
    await db.query(`
      CREATE TRIGGER study_turnaround_insert AFTER INSERT ON study REFERENCING NEW TABLE AS inserted
      FOR EACH STATEMENT EXECUTE FUNCTION study_turnaround_on_study_insert()`);

    await db.query(`
      CREATE FUNCTION study_turnaround_on_study_update() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        UPDATE study_turnaround t
        SET started_at = study_turnaround_start(n.procedure_ended_at, n.procedure_started_at, n.created_at),
            start_basis = study_turnaround_basis(n.procedure_ended_at, n.procedure_started_at),
            physician_id = CASE WHEN t.signed_at IS NULL THEN n.operator_id ELSE t.physician_id END
        FROM updated n JOIN previous o ON o.id = n.id
        WHERE t.study_id = n.id
          AND (o.procedure_ended_at IS DISTINCT FROM n.procedure_ended_at
            OR o.procedure_started_at IS DISTINCT FROM n.procedure_started_at
            OR o.created_at IS DISTINCT FROM n.created_at
            OR o.operator_id IS DISTINCT FROM n.operator_id);
        RETURN NULL;
      END $$`);
    await db.query(`
      CREATE TRIGGER study_turnaround_update AFTER UPDATE ON study REFERENCING OLD TABLE AS previous NEW TABLE AS updated
      FOR EACH STATEMENT EXECUTE FUNCTION study_turnaround_on_study_update()`);

    // The quality counts of one signed version, from what was signed: the record's vessels (pressures,
    // drift check, transit times), the physiology core's analysis (warnings per vessel, endotype) and
    // the thresholds the report was judged by (drift window, injections expected per state).
    await db.query(`
      CREATE FUNCTION study_turnaround_quality(snapshot jsonb, analysis jsonb, thresholds jsonb,
        OUT endotype text, OUT vessels integer, OUT warned_vessels integer, OUT pressure_vessels integer,
        OUT drift_vessels integer, OUT drift_outside_vessels integer, OUT drift_bins smallint[],
        OUT thermo_vessels integer, OUT thermo_complete_vessels integer)
      LANGUAGE sql IMMUTABLE AS $$
        SELECT analysis->>'endotype',
               (SELECT count(*)::int FROM jsonb_array_elements(CASE WHEN jsonb_typeof(analysis->'vessels') = 'array' THEN analysis->'vessels' ELSE '[]' END)),
               (SELECT count(*)::int FROM jsonb_array_elements(CASE WHEN jsonb_typeof(analysis->'vessels') = 'array' THEN analysis->'vessels' ELSE '[]' END) a
                 WHERE jsonb_typeof(a->'warnings') = 'array' AND jsonb_array_length(a->'warnings') > 0),
               count(*) FILTER (WHERE v.pressure)::int,
               count(*) FILTER (WHERE v.pressure AND v.drift IS NOT NULL)::int,
               count(*) FILTER (WHERE v.pressure AND (v.drift < v.low OR v.drift > v.high))::int,
               COALESCE(array_agg(width_bucket(v.drift, '{0.95,0.96,0.97,0.98,0.99,1.00,1.01,1.02,1.03,1.04,1.05}'::numeric[])::smallint)
                          FILTER (WHERE v.pressure AND v.drift IS NOT NULL), '{}'),
               count(*) FILTER (WHERE v.rest_n + v.hyp_n > 0)::int,
               count(*) FILTER (WHERE v.rest_n + v.hyp_n > 0 AND v.rest_n >= v.min_n AND v.hyp_n >= v.min_n)::int
        FROM (
          SELECT (e->>'restPa' IS NOT NULL AND e->>'restPd' IS NOT NULL)
                   OR (e->>'hyperemiaPa' IS NOT NULL AND e->>'hyperemiaPd' IS NOT NULL)
                   OR e->>'consoleFfr' IS NOT NULL OR e->>'nhprValue' IS NOT NULL AS pressure,
                 CASE WHEN jsonb_typeof(e->'driftPdPa') = 'number' THEN (e->>'driftPdPa')::numeric END AS drift,
                 COALESCE((thresholds->>'driftLow')::numeric, 0.98) AS low,
                 COALESCE((thresholds->>'driftHigh')::numeric, 1.02) AS high,
                 COALESCE((thresholds->>'minInjections')::int, 3) AS min_n,
                 (SELECT count(*) FROM jsonb_array_elements(CASE WHEN jsonb_typeof(e->'restTransit') = 'array' THEN e->'restTransit' ELSE '[]' END) x WHERE jsonb_typeof(x) = 'number') AS rest_n,
                 (SELECT count(*) FROM jsonb_array_elements(CASE WHEN jsonb_typeof(e->'hyperemiaTransit') = 'array' THEN e->'hyperemiaTransit' ELSE '[]' END) x WHERE jsonb_typeof(x) = 'number') AS hyp_n
          FROM jsonb_array_elements(CASE WHEN jsonb_typeof(snapshot->'vessels') = 'array' THEN snapshot->'vessels' ELSE '[]' END) e
        ) v
      $$`);

    // A signature: the first one sets the time and the physician; the newest version brings its quality.
    await db.query(`
      CREATE FUNCTION study_turnaround_on_signature() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        -- One UPDATE per study (each update leaves a row version behind until vacuum).
        UPDATE study_turnaround t
        SET signed_at = LEAST(COALESCE(t.signed_at, f.signed_at), f.signed_at),
            physician_id = CASE WHEN t.signed_at IS NULL OR f.signed_at < t.signed_at THEN f.signed_by ELSE t.physician_id END,
            endotype = q.endotype, vessels = q.vessels, warned_vessels = q.warned_vessels,
            pressure_vessels = q.pressure_vessels, drift_vessels = q.drift_vessels,
            drift_outside_vessels = q.drift_outside_vessels, drift_bins = q.drift_bins,
            thermo_vessels = q.thermo_vessels, thermo_complete_vessels = q.thermo_complete_vessels
        FROM (SELECT DISTINCT ON (study_id) study_id, signed_at, signed_by FROM signed ORDER BY study_id, version_no, signed_at) f
        JOIN (SELECT DISTINCT ON (study_id) study_id, snapshot, analysis, thresholds FROM signed ORDER BY study_id, version_no DESC) l ON l.study_id = f.study_id
        CROSS JOIN LATERAL study_turnaround_quality(l.snapshot, l.analysis, l.thresholds) q
        WHERE t.study_id = f.study_id;
        RETURN NULL;
      END $$`);
    await db.query(`
      CREATE TRIGGER study_turnaround_signature AFTER INSERT ON report_version REFERENCING NEW TABLE AS signed
      FOR EACH STATEMENT EXECUTE FUNCTION study_turnaround_on_signature()`);

    // The first completed code review, and the first delivery to the EHR, stay as they were first reached.
    await db.query(`
      CREATE FUNCTION study_turnaround_on_review() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        UPDATE study_turnaround t SET coded_at = LEAST(COALESCE(t.coded_at, r.completed_at), r.completed_at)
        FROM reviews r WHERE t.study_id = r.study_id AND r.status = 'coded' AND r.completed_at IS NOT NULL;
        RETURN NULL;
      END $$`);
    await db.query(`
      CREATE FUNCTION study_turnaround_on_delivery() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        UPDATE study_turnaround t SET delivered_at = LEAST(COALESCE(t.delivered_at, d.delivered_at), d.delivered_at)
        FROM (SELECT study_id, min(delivered_at) AS delivered_at FROM deliveries WHERE delivered_at IS NOT NULL GROUP BY study_id) d
        WHERE t.study_id = d.study_id;
        RETURN NULL;
      END $$`);
    for (const op of ['INSERT', 'UPDATE']) {
      const suffix = op.toLowerCase();
      await db.query(`
        CREATE TRIGGER study_turnaround_review_${suffix} AFTER ${op} ON coding_review REFERENCING NEW TABLE AS reviews
        FOR EACH STATEMENT EXECUTE FUNCTION study_turnaround_on_review()`);
      await db.query(`
        CREATE TRIGGER study_turnaround_delivery_${suffix} AFTER ${op} ON report_delivery REFERENCING NEW TABLE AS deliveries
        FOR EACH STATEMENT EXECUTE FUNCTION study_turnaround_on_delivery()`);
    }

    // Studies recorded before this migration: the same rules, once.
    await db.query(`
      INSERT INTO study_turnaround (study_id, started_at, start_basis, physician_id)
      SELECT id, study_turnaround_start(procedure_ended_at, procedure_started_at, created_at),
             study_turnaround_basis(procedure_ended_at, procedure_started_at), operator_id
      FROM study ON CONFLICT (study_id) DO NOTHING`);
    await db.query(`
      WITH first AS (SELECT DISTINCT ON (study_id) study_id, signed_at, signed_by FROM report_version ORDER BY study_id, version_no)
      UPDATE study_turnaround t SET signed_at = f.signed_at, physician_id = f.signed_by FROM first f WHERE t.study_id = f.study_id`);
    await db.query(`
      UPDATE study_turnaround t
      SET endotype = q.endotype, vessels = q.vessels, warned_vessels = q.warned_vessels,
          pressure_vessels = q.pressure_vessels, drift_vessels = q.drift_vessels,
          drift_outside_vessels = q.drift_outside_vessels, drift_bins = q.drift_bins,
          thermo_vessels = q.thermo_vessels, thermo_complete_vessels = q.thermo_complete_vessels
      FROM (SELECT DISTINCT ON (study_id) study_id, snapshot, analysis, thresholds FROM report_version ORDER BY study_id, version_no DESC) l
      CROSS JOIN LATERAL study_turnaround_quality(l.snapshot, l.analysis, l.thresholds) q
      WHERE t.study_id = l.study_id`);
    // Before this table only the newest completed review was kept: it stands in for the first.
    await db.query(`
      UPDATE study_turnaround t SET coded_at = r.completed_at FROM coding_review r
      WHERE t.study_id = r.study_id AND r.status = 'coded'`);
    await db.query(`
      UPDATE study_turnaround t SET delivered_at = d.delivered_at
      FROM (SELECT study_id, min(delivered_at) AS delivered_at FROM report_delivery WHERE delivered_at IS NOT NULL GROUP BY study_id) d
      WHERE t.study_id = d.study_id`);

    await db.query(`
      CREATE TABLE overdue_notice (
        study_id uuid PRIMARY KEY REFERENCES study (id) ON DELETE CASCADE,
        physician_id uuid NULL REFERENCES app_user (id) ON DELETE SET NULL,
        target_hours numeric NOT NULL,
        due_at timestamptz NOT NULL,
        queued_at timestamptz NOT NULL DEFAULT now(),
        sent_at timestamptz NULL,
        recipients integer NULL
      )`);
  }

  async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE overdue_notice`);
    for (const suffix of ['insert', 'update']) {
      await db.query(`DROP TRIGGER study_turnaround_review_${suffix} ON coding_review`);
      await db.query(`DROP TRIGGER study_turnaround_delivery_${suffix} ON report_delivery`);
    }
    await db.query(`DROP TRIGGER study_turnaround_signature ON report_version`);
    await db.query(`DROP TRIGGER study_turnaround_update ON study`);
    await db.query(`DROP TRIGGER study_turnaround_insert ON study`);
    await db.query(`DROP FUNCTION study_turnaround_on_delivery()`);
    await db.query(`DROP FUNCTION study_turnaround_on_review()`);
    await db.query(`DROP FUNCTION study_turnaround_on_signature()`);
    await db.query(`DROP FUNCTION study_turnaround_quality(jsonb, jsonb, jsonb)`);
    await db.query(`DROP FUNCTION study_turnaround_on_study_update()`);
    await db.query(`DROP FUNCTION study_turnaround_on_study_insert()`);
    await db.query(`DROP FUNCTION study_turnaround_basis(timestamptz, timestamptz)`);
    await db.query(`DROP FUNCTION study_turnaround_start(timestamptz, timestamptz, timestamptz)`);
    await db.query(`DROP TABLE study_turnaround`);
  }
}
