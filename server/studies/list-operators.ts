import type { DataSource } from 'typeorm';

/** Physicians who can be named as a study's operator, by name. */
export async function listOperators(dataSource: DataSource): Promise<{ items: Array<{ id: string; displayName: string }> }> {
  const rows: Array<{ id: string; display_name: string }> = await dataSource.query(`SELECT id, display_name FROM app_user WHERE role = 'physician' ORDER BY display_name, id`);
  return { items: rows.map((r) => ({ id: r.id, displayName: r.display_name })) };
}
