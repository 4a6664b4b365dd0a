import { Column, Entity, PrimaryColumn } from 'typeorm';
import type { ArrangementData } from '../../shared/schemas/arrangement.js';

/** A crane model and its arrangement data, stored whole as the shared schema describes it. */
@Entity('crane_model')
export class CraneModel {
  @PrimaryColumn('varchar', { length: 36 })
  id!: string;

  /** The arrangement data's own id, unique: import matches on it. */
  @Column('varchar', { length: 64, name: 'arrangement_id', unique: true })
  arrangementId!: string;

  @Column('simple-json')
  arrangement!: ArrangementData;

  @Column('varchar', { length: 30, name: 'created_at' })
  createdAt!: string;

  @Column('varchar', { length: 30, name: 'updated_at' })
  updatedAt!: string;
}
