import type { DataSource } from 'typeorm';
import type { Role } from '../../shared/auth/permissions';

/**
 * The user behind a sign-in, by issuer and subject: created on first sign-in, their e-mail, name
 * and role refreshed from the provider's claims at every later one.
 */
export async function provisionUser(
  dataSource: DataSource,
  user: { issuer: string; subject: string; email: string; displayName: string; role: Role | null },
): Promise<{ id: string }> {
  const [row] = await dataSource.query(
    `INSERT INTO app_user (issuer, subject, email, display_name, role, last_sign_in_at)
     VALUES ($1, $2, $3, $4, $5, now())
     ON CONFLICT (issuer, subject) DO UPDATE
       SET email = EXCLUDED.email, display_name = EXCLUDED.display_name, role = EXCLUDED.role,
           last_sign_in_at = now(), updated_at = now()
     RETURNING id`,
    [user.issuer, user.subject, user.email, user.displayName, user.role],
  );
  return { id: row.id as string };
}
