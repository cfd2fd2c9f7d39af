import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';
import type { Role } from '../../../shared/auth/permissions';
import { Timestamped } from './timestamps';

/** A person who signs in. `role` is null until the identity provider grants one. */
@Entity({ name: 'app_user' })
export class User extends Timestamped {
  @PrimaryGeneratedColumn('uuid')
  id!: string;

  /** Subject identifier from the identity provider (`sub` claim), unique per issuer. */
  @Column('text')
  issuer!: string;

  @Column('text')
  subject!: string;

  @Column('text')
  email!: string;

  @Column('text', { name: 'display_name' })
  displayName!: string;

  @Column('text', { nullable: true })
  role!: Role | null;

  @Column('timestamptz', { name: 'last_sign_in_at', nullable: true })
  lastSignInAt!: Date | null;
}
