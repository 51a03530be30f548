/** Study: one research project (a network panel with its team, models, fits and reports). */
import { EntitySchema } from 'typeorm';

export interface Study {
  id: number;
  name: string;
  description: string;
  createdAt: Date;
  updatedAt: Date;
}

export const StudyEntity = new EntitySchema<Study>({
  name: 'Study',
  tableName: 'studies',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    name: { type: 'varchar', length: 120 },
    description: { type: 'text', default: '' },
    createdAt: { type: 'datetime', createDate: true },
    updatedAt: { type: 'datetime', updateDate: true },
  },
});
