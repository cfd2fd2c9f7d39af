import { CreateDateColumn, UpdateDateColumn } from 'typeorm';

/** Created/updated times, always with a time zone. */
export abstract class Timestamped {
  @CreateDateColumn({ name: 'created_at', type: 'timestamptz' })
  createdAt!: Date;

  @UpdateDateColumn({ name: 'updated_at', type: 'timestamptz' })
  updatedAt!: Date;
}
