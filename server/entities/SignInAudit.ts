import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';
import type { SignInAuditKind } from '../../shared/schemas/audit.js';

/** One line of the sign-in audit. Never holds a password or a token. */
@Entity('sign_in_audit')
export class SignInAudit {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  @Column('varchar', { length: 30 })
  at!: string;

  @Column('varchar', { length: 24 })
  kind!: SignInAuditKind;

  @Column('varchar', { length: 254, nullable: true })
  email!: string | null;

  @Column('varchar', { length: 36, name: 'user_id', nullable: true })
  userId!: string | null;

  @Column('varchar', { length: 64, nullable: true })
  ip!: string | null;

  @Column('varchar', { length: 300, nullable: true })
  detail!: string | null;
}
