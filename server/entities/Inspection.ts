import { Column, Entity, PrimaryColumn } from 'typeorm';
import type { InspectionResult } from '../../shared/schemas/fleet.js';

/** One inspection of a component. Never changed after it is recorded. */
@Entity('inspection')
export class Inspection {
  @PrimaryColumn('varchar', { length: 36 })
  id!: string;

  @Column('varchar', { length: 36, name: 'component_id' })
  componentId!: string;

  @Column('varchar', { length: 30 })
  at!: string;

  @Column('varchar', { length: 36, name: 'by_user_id' })
  byUserId!: string;

  @Column('varchar', { length: 16 })
  result!: InspectionResult;

  @Column('text')
  notes!: string;

  @Column('simple-json', { name: 'photo_ids' })
  photoIds!: string[];
}
