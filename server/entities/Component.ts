import { Column, Entity, PrimaryColumn } from 'typeorm';
import type { ComponentKind, ComponentStatus } from '../../shared/schemas/fleet.js';

/**
 * A physical part by serial number. `status` is kept by the inspection commands: quarantined
 * while the latest inspection found damage, retired for good when retired.
 */
@Entity('component')
export class Component {
  @PrimaryColumn('varchar', { length: 36 })
  id!: string;

  @Column('varchar', { length: 64, unique: true })
  serial!: string;

  @Column('varchar', { length: 16 })
  kind!: ComponentKind;

  @Column('varchar', { length: 64, name: 'type_id' })
  typeId!: string;

  @Column('varchar', { length: 36, name: 'model_id' })
  modelId!: string;

  @Column('varchar', { length: 36, name: 'unit_id', nullable: true })
  unitId!: string | null;

  @Column('varchar', { length: 120 })
  location!: string;

  @Column('varchar', { length: 16 })
  status!: ComponentStatus;

  @Column('varchar', { length: 500, name: 'retired_reason', nullable: true })
  retiredReason!: string | null;

  @Column('varchar', { length: 30, name: 'created_at' })
  createdAt!: string;

  @Column('varchar', { length: 30, name: 'updated_at' })
  updatedAt!: string;
}
