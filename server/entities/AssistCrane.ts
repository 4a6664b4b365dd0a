import { Column, Entity, PrimaryColumn } from 'typeorm';
import type { AssistCrane as AssistCraneData } from '../../shared/schemas/arrangement.js';

/** An assist crane unit with its capacity charts and its own operator. */
@Entity('assist_crane')
export class AssistCrane {
  @PrimaryColumn('varchar', { length: 36 })
  id!: string;

  @Column('varchar', { length: 32, name: 'fleet_number', unique: true })
  fleetNumber!: string;

  @Column('varchar', { length: 120, name: 'operator_name' })
  operatorName!: string;

  @Column('varchar', { length: 36, name: 'operator_user_id', nullable: true })
  operatorUserId!: string | null;

  @Column('varchar', { length: 120 })
  location!: string;

  @Column('simple-json')
  data!: AssistCraneData;

  @Column('varchar', { length: 30, name: 'created_at' })
  createdAt!: string;
}
