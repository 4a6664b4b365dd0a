import { Column, Entity, PrimaryColumn } from 'typeorm';

export type SignInLinkKind = 'invitation' | 'reset';

/** A single-use link e-mailed to set a password (invitation or reset). Only its hash is stored. */
@Entity('sign_in_link')
export class SignInLink {
  @PrimaryColumn('varchar', { length: 36 })
  id!: string;

  @Column('varchar', { length: 36, name: 'user_id' })
  userId!: string;

  @Column('varchar', { length: 12 })
  kind!: SignInLinkKind;

  @Column('varchar', { length: 64, name: 'token_hash', unique: true })
  tokenHash!: string;

  @Column('varchar', { length: 30, name: 'created_at' })
  createdAt!: string;

  @Column('varchar', { length: 30, name: 'expires_at' })
  expiresAt!: string;

  @Column('varchar', { length: 30, name: 'used_at', nullable: true })
  usedAt!: string | null;
}
