import type { DataSource, EntityManager } from 'typeorm';
import type { Role } from '../../shared/auth/permissions';
import type { OperatorList } from '../../shared/study/operators';
import { User } from '../db/entities/user.entity';
import { UnacceptableValueError } from '../errors';

/** Who can be named as a study's operator: a physician on file. */
const operatorRole: Role = 'physician';

/** Physicians who can be named as a study's operator, by name. */
export async function listOperators(dataSource: DataSource): Promise<OperatorList> {
  const rows = await dataSource.manager.find(User, { where: { role: operatorRole }, select: { id: true, displayName: true }, order: { displayName: 'ASC', id: 'ASC' } });
  return { items: rows.map((r) => ({ id: r.id, displayName: r.displayName })) };
}

/** The operator must be a physician on file: an id of nobody, or of another role, is refused. */
export async function checkOperator(db: EntityManager, operatorId: string | null | undefined): Promise<void> {
  if (!operatorId) return;
  const row = await db.findOne(User, { where: { id: operatorId }, select: { id: true, role: true } });
  if (row?.role === operatorRole) return;
  throw new UnacceptableValueError('The operator must be a physician.', [
    { pointer: '/details/operatorId', detail: row ? 'Operator: this person is not a physician. Choose a physician from the list.' : 'Operator: nobody has this id. Choose a physician from the list.' },
  ]);
}
