import { Column, Entity, PrimaryColumn } from 'typeorm';
import type { Qualification } from '../../shared/schemas/users.js';
import type { UnitSystem } from '../../shared/units/quantity.js';

/** A person who may sign in. Crew roles are given per job; qualifications say which they may hold. */
@Entity('user')
export class User {
  @PrimaryColumn('varchar', { length: 36 })
  id!: string;

  /** Stored lower-cased so that uniqueness is case-insensitive. */
  @Column('varchar', { length: 254, unique: true })
  email!: string;

  @Column('varchar', { length: 120, name: 'display_name' })
  displayName!: string;

  /** Null until an invited person sets a password. */
  @Column('varchar', { length: 100, name: 'password_hash', nullable: true })
  passwordHash!: string | null;

  @Column('simple-json')
  qualifications!: Qualification[];

  @Column('boolean', { name: 'is_admin', default: false })
  isAdmin!: boolean;

  @Column('boolean', { default: true })
  active!: boolean;

  /** The admin marks this person as qualified to inspect an assembled crane (the job's final sign-off). */
  @Column('boolean', { name: 'can_inspect', default: false })
  canInspect!: boolean;

  /** Metric or US customary on this person's screens; every figure is stored in SI whatever they pick. */
  @Column('varchar', { length: 10, default: 'metric' })
  units!: UnitSystem;

  @Column('varchar', { length: 30, name: 'created_at' })
  createdAt!: string;

  @Column('varchar', { length: 30, name: 'updated_at' })
  updatedAt!: string;
}
