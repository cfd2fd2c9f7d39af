import type { DataSource } from 'typeorm';
import type { OperatorList } from '../../shared/study/operators';
import { User } from '../db/entities/user.entity';

/** Physicians who can be named as a study's operator, by name. */
export async function listOperators(dataSource: DataSource): Promise<OperatorList> {
  const rows = await dataSource.manager.find(User, { where: { role: 'physician' }, select: { id: true, displayName: true }, order: { displayName: 'ASC', id: 'ASC' } });
  return { items: rows.map((r) => ({ id: r.id, displayName: r.displayName })) };
}
