import { Column, Entity, Index, PrimaryColumn } from 'typeorm';

/**
 * One refresh token of a sign-in "family". Only the SHA-256 of the token is stored. A token is
 * rotated once; its successor's value is derived from it, so a second tab presenting the same
 * token within the grace period receives the same successor.
 */
@Entity('refresh_token')
export class RefreshToken {
  @PrimaryColumn('varchar', { length: 36 })
  id!: string;

  @Index()
  @Column('varchar', { length: 36, name: 'family_id' })
  familyId!: string;

  @Column('varchar', { length: 36, name: 'user_id' })
  userId!: string;

  @Column('varchar', { length: 64, name: 'token_hash', unique: true })
  tokenHash!: string;

  @Column('varchar', { length: 30, name: 'created_at' })
  createdAt!: string;

  /** When the family must end whatever its use (the absolute limit). */
  @Column('varchar', { length: 30, name: 'family_expires_at' })
  familyExpiresAt!: string;

  @Column('varchar', { length: 30, name: 'rotated_at', nullable: true })
  rotatedAt!: string | null;

  @Column('varchar', { length: 30, name: 'revoked_at', nullable: true })
  revokedAt!: string | null;
}
