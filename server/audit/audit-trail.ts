import { filtersUsed, type AuditFilters, type AuditTrailPage } from '../../shared/audit/trail';
import { recordAudit, type AuditActor, type AuditEntry } from './audit';
import { decodeAuditCursor, encodeAuditCursor, loadAuditRows, prepareSearch, toTrailItem, type Db } from './queries/audit-trail';

/**
 * One page of the trail for people: in words, with the cursor of the next page. With `actor`, the
 * search is recorded with the filters used (its detail completed with the rows returned) by the
 * statement that reads the page: one round trip, one commit.
 */
export async function readAuditTrail(db: Db, filters: AuditFilters, cursor: string | undefined, limit: number, actor?: AuditActor): Promise<AuditTrailPage> {
  const after = cursor ? decodeAuditCursor(cursor) : null;
  const audit: AuditEntry | undefined = actor && {
    ...actor,
    action: 'search',
    entityType: 'audit-event',
    outcome: 'success',
    detail: { filters: filtersUsed(filters), ...(cursor ? { nextPage: true } : {}) },
  };
  const search = await prepareSearch(db, filters);
  if (search.empty) {
    if (audit) await recordAudit(db, { ...audit, detail: { ...audit.detail, returned: 0 } });
    return { items: [], nextCursor: null };
  }
  const rows = await loadAuditRows(db, search, after, limit + 1, audit ? { entry: audit, shown: limit } : undefined);
  const page = rows.slice(0, limit);
  return {
    items: page.map(toTrailItem),
    nextCursor: rows.length > limit ? encodeAuditCursor(page[page.length - 1]) : null,
  };
}

