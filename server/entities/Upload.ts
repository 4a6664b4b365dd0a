import { Column, Entity, PrimaryColumn } from 'typeorm';

/** What a photo belongs to, which decides who may see it. Null until it is attached. */
export type UploadOwnerKind = 'inspection' | 'step' | 'hold' | 'defect';

/** A stored photo; the file itself lives behind the storage interface under a generated name. */
@Entity('upload')
export class Upload {
  @PrimaryColumn('varchar', { length: 36 })
  id!: string;

  @Column('varchar', { length: 80, name: 'stored_name' })
  storedName!: string;

  @Column('varchar', { length: 80, name: 'thumbnail_name' })
  thumbnailName!: string;

  @Column('varchar', { length: 20, name: 'mime_type' })
  mimeType!: 'image/jpeg' | 'image/png' | 'image/webp';

  @Column('integer', { name: 'size_bytes' })
  sizeBytes!: number;

  @Column('integer', { name: 'width_px' })
  widthPx!: number;

  @Column('integer', { name: 'height_px' })
  heightPx!: number;

  @Column('varchar', { length: 36, name: 'uploaded_by' })
  uploadedBy!: string;

  @Column('varchar', { length: 30, name: 'created_at' })
  createdAt!: string;

  @Column('varchar', { length: 16, name: 'owner_kind', nullable: true })
  ownerKind!: UploadOwnerKind | null;

  @Column('varchar', { length: 36, name: 'owner_id', nullable: true })
  ownerId!: string | null;
}
