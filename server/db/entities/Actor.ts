/** Actor: one member of a study's network; `index` is the actor's row/column in every wave's matrix (from 0). */
import { EntitySchema } from 'typeorm';

export interface Actor {
  id: number;
  studyId: number;
  index: number;
  label: string;
}

export const ActorEntity = new EntitySchema<Actor>({
  name: 'Actor',
  tableName: 'actors',
  columns: {
    id: { type: 'integer', primary: true, generated: 'increment' },
    studyId: { type: 'integer' },
    index: { type: 'integer' },
    label: { type: 'varchar', length: 60 },
  },
  uniques: [
    { name: 'UQ_actors_study_index', columns: ['studyId', 'index'] },
    { name: 'UQ_actors_study_label', columns: ['studyId', 'label'] },
  ],
  foreignKeys: [
    { name: 'FK_actors_study', target: 'Study', columnNames: ['studyId'], referencedColumnNames: ['id'], onDelete: 'CASCADE' },
  ],
});
