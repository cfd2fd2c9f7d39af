import type { DataSource } from 'typeorm';
import { User } from '../db/entities/user.entity';

/** Physicians who can be named as a study's operator, by name. */
export async function listOperators(dataSource: DataSource): Promise<{ items: Array<{ id: string; displayName: string }> }> {
  const rows = await dataSource.manager.find(User, { where: { role: 'physician' }, select: { id: true, displayName: true }, order: { displayName: 'ASC', id: 'ASC' } });
  return { items: rows.map((r) => ({ id: r.id, displayName: r.displayName })) };
}
