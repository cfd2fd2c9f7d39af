import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';
import { Timestamped } from './timestamps';

@Entity({ name: 'patient' })
export class Patient extends Timestamped {
  @PrimaryGeneratedColumn('uuid')
  id!: string;

  /** Medical record number, unique within the hospital. */
  @Column('text')
  mrn!: string;

  @Column('text', { name: 'family_name' })
  familyName!: string;

  @Column('text', { name: 'given_name' })
  givenName!: string;

  @Column('date', { name: 'birth_date' })
  birthDate!: string;

  /** Administrative sex as FHIR codes it: male | female | other | unknown. */
  @Column('text')
  sex!: string;
}
