import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Delivery of each signed report version to the EHR: one row per version, updated as the delivery
 * job tries, succeeds, retries or stops. The error text is written by Isobar (no patient data); the
 * EHR's OperationOutcome issues are kept as they came. `lease_until` lets one sender at a time own a
 * send: a sender that dies mid-send leaves a lease that expires, and the next try sends again (the
 * EHR recognises the resend by Bundle.identifier).
 */
export class ReportDelivery1765324800000 implements MigrationInterface {
  name = 'ReportDelivery1765324800000';

  async up(db: QueryRunner): Promise<void> {
    await db.query(`
      CREATE TABLE report_delivery (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        report_version_id uuid NOT NULL CONSTRAINT report_delivery_version_key UNIQUE REFERENCES report_version (id) ON DELETE RESTRICT,
        study_id uuid NOT NULL REFERENCES study (id) ON DELETE RESTRICT,
        status text NOT NULL DEFAULT 'queued'
          CHECK (status IN ('queued', 'sending', 'delivered', 'failed-retrying', 'rejected', 'given-up')),
        attempts integer NOT NULL DEFAULT 0 CHECK (attempts >= 0),
        last_error text NULL,
        http_status integer NULL,
        issues jsonb NULL,
        bundle_identifier text NULL,
        ehr_report_id text NULL,
        ehr_ids jsonb NOT NULL DEFAULT '[]'::jsonb,
        queued_at timestamptz NOT NULL DEFAULT now(),
        first_attempt_at timestamptz NULL,
        last_attempt_at timestamptz NULL,
        next_attempt_at timestamptz NULL,
        lease_until timestamptz NULL,
        delivered_at timestamptz NULL,
        stopped_at timestamptz NULL,
        resend_requested_by uuid NULL REFERENCES app_user (id) ON DELETE SET NULL,
        resend_requested_at timestamptz NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        updated_at timestamptz NOT NULL DEFAULT now()
      )`);
    await db.query(`CREATE INDEX report_delivery_study_idx ON report_delivery (study_id)`);
    await db.query(`CREATE INDEX report_delivery_attention_idx ON report_delivery (updated_at DESC) WHERE status IN ('rejected', 'given-up', 'failed-retrying')`);
  }

  async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE report_delivery`);
  }
}
