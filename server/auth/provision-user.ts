import type { DataSource } from 'typeorm';
import type { Role } from '../../shared/auth/permissions';
import { User } from '../db/entities/user.entity';

/**
 * The user behind a sign-in, by issuer and subject: created on first sign-in, their e-mail, name
 * and role refreshed from the provider's claims at every later one.
 */
export async function provisionUser(
  dataSource: DataSource,
  user: { issuer: string; subject: string; email: string; displayName: string; role: Role | null },
): Promise<{ id: string }> {
  // One statement (INSERT … ON CONFLICT (issuer, subject) DO UPDATE), so two first sign-ins at once make one user;
  // TypeORM adds `updated_at = DEFAULT` (now()) to the update.
  const { raw } = await dataSource
    .createQueryBuilder()
    .insert()
    .into(User)
    .values({ issuer: user.issuer, subject: user.subject, email: user.email, displayName: user.displayName, role: user.role, lastSignInAt: () => 'now()' })
    .orUpdate(['email', 'display_name', 'role', 'last_sign_in_at'], ['issuer', 'subject'])
    .updateEntity(false)
    .returning(['id'])
    .execute();
  return { id: (raw as Pick<User, 'id'>[])[0].id };
}
