import { Column, Entity, PrimaryColumn } from 'typeorm';
import type { AsBuilt } from '../../shared/schemas/fleet.js';

/** A physical crane, known on site by its fleet number. */
@Entity('crane_unit')
export class CraneUnit {
  @PrimaryColumn('varchar', { length: 36 })
  id!: string;

  @Column('varchar', { length: 32, name: 'fleet_number', unique: true })
  fleetNumber!: string;

  @Column('varchar', { length: 36, name: 'model_id' })
  modelId!: string;

  @Column('varchar', { length: 64, name: 'serial_number' })
  serialNumber!: string;

  @Column('varchar', { length: 120 })
  location!: string;

  @Column('text')
  notes!: string;

  @Column('simple-json', { name: 'as_built', nullable: true })
  asBuilt!: AsBuilt | null;

  @Column('varchar', { length: 30, name: 'created_at' })
  createdAt!: string;

  @Column('varchar', { length: 30, name: 'updated_at' })
  updatedAt!: string;
}
