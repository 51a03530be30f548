/**
 * Study data: the upload contract (zod) and the response types of the study data endpoints.
 *
 * Endpoints (under /api, see shared/api.ts for auth and errors):
 *   POST /studies/:studyId/data                DataUploadBody -> DataUploadResponse (lead, statistician; replaces the study's data)
 *   GET  /studies/:studyId/data                               -> StudyDataResponse  (members)
 *   POST /studies/:studyId/data/preview        DataUploadBody -> DataPreviewResponse (lead, statistician; stores nothing)
 *   GET  /studies/:studyId/data/waves/:index                  -> WaveTiesResponse   (members; index counts from 1)
 *   GET  /studies/:studyId/data/layout                        -> DataLayoutResponse (members; one seeded layout for every wave)
 *   GET  /studies/:studyId/data/waves/:index.csv              -> text/csv, the wave in the format it was uploaded in
 *   GET  /studies/:studyId/data/actors.csv                    -> text/csv, the actors file (labels, covariates, presence)
 *   GET  /studies/:studyId/data/fixed-pairs.csv               -> text/csv, the fixed pairs (404 when there are none)
 *
 * Replacing data that models, fits or batches were built on needs `confirmReplace: true` in the
 * body; without it the answer is 409 data_in_use with DataReplaceInfo in the details. While a fit or
 * batch is queued or running, replacing is refused even with confirmation.
 *
 * File conventions (the client reads each file as text and sends it in the JSON body):
 * - Any file: UTF-8 text, at most MAX_FILE_BYTES (2 MB); a leading byte-order mark is ignored;
 *   blank lines are skipped; fields are separated by commas (or by semicolons or tabs when the
 *   first line has no comma); a field may be quoted with "..." ("" inside for a quote); spaces
 *   around fields are trimmed. Actor labels are case-sensitive, at most 60 characters.
 * - The missing marker (default "NA", case-sensitive) stands for an unobserved value.
 * - Edge list ('edgelist'), one file per wave: one tie a line, `sender,receiver` by actor label.
 *   An optional third column gives the value: 1 (a tie, also the default), 0 (no tie) or the
 *   missing marker (the pair was not observed). The first line is a header, and skipped, when its
 *   first two fields are sender/receiver, from/to, ego/alter or source/target (any case).
 *   Actors with no ties appear only if the actors file lists them.
 * - Adjacency matrix ('matrix'), one file per wave: a square table of 0, 1 or the missing marker;
 *   the first row holds the actor labels (its first cell, the corner, is ignored) and the first
 *   column the same labels in the same order. The diagonal must be 0 (or missing). Later waves may
 *   list the actors in another order: rows and columns are matched by label.
 * - Actors file (optional; needed for covariates): a header row whose first column is `label`, then
 *   one column per covariate; one row per actor. A column whose values are all numbers (or missing)
 *   is numeric, any other is categorical. A covariate that changes between waves has one column per
 *   wave named `name@1`, `name@2`, ... (wave numbers from 1, no gaps; at least waves 1 .. M-1 of M,
 *   since the value at wave m acts in the period from wave m to m+1). With an actors file, its
 *   labels are the actor set and its order the actor order; without one, the actors are the labels
 *   met in the wave files, in order of first appearance.
 * - Changing composition: columns `present@1` .. `present@M` of the actors file (all M, values 1 or
 *   0) say in which waves an actor belongs to the group. An absent actor may have no ties in that
 *   wave; in a period an actor acts only when present at both of its waves.
 * - Fixed pairs ('fixedPairs', optional): one pair a line, `sender,receiver,value[,waves]`: value 0
 *   (never a tie: a structural zero) or 1 (always a tie); waves as "2-3", "1 3" or "1;3", empty for
 *   every wave. The waves must agree with the value (a missing observation takes it). A pair fixed
 *   at both waves of a period with the same value never changes in that period, in fits and batches.
 *   A header line sender,receiver,... is skipped as for edge lists.
 *
 * Problems are reported with the file, line and column (both counted from 1) and collected, up to
 * MAX_PROBLEMS, in the 400 error's details (DataProblemDetails, code data_invalid). Nothing stored
 * changes unless the whole upload is valid.
 */
import { z } from 'zod';
import { PLAIN_LINE_MESSAGE, isPlainLine } from './plainText';

export const MAX_FILE_BYTES = 2 * 1024 * 1024;
export const MAX_PROBLEMS = 20;
export const MAX_WAVES = 20;
export const MAX_ACTORS = 1000;
export const MAX_LABEL_LENGTH = 60;
/** A wave-to-wave Jaccard index below this draws a caution (Snijders, van de Bunt & Steglich 2010, from memory). */
export const JACCARD_CAUTION = 0.2;

export const DATA_FORMATS = ['edgelist', 'matrix'] as const;
export type DataFormat = (typeof DATA_FORMATS)[number];

const fileText = z.string({ error: 'The file content must be text.' });
const fileName = z.string().trim().max(200).optional();

export const dataUploadBodySchema = z.object({
  format: z.enum(DATA_FORMATS, { error: 'The format must be "edgelist" or "matrix".' }),
  waves: z
    .array(
      z.object({
        label: z.string().trim().max(MAX_LABEL_LENGTH, `A wave label may have at most ${MAX_LABEL_LENGTH} characters.`).refine(isPlainLine, `A wave label ${PLAIN_LINE_MESSAGE}.`),
        content: fileText,
        /** The file's name, used in problem messages (defaults to the wave label). */
        fileName,
      }),
    )
    .max(MAX_WAVES, `At most ${MAX_WAVES} waves can be uploaded.`),
  actors: z.object({ content: fileText, fileName }).optional(),
  /** Pairs that cannot change (structural zeros and ones), see the file conventions above. */
  fixedPairs: z.object({ content: fileText, fileName }).optional(),
  missingMarker: z.string().trim().min(1, 'The missing marker cannot be empty.').max(20).default('NA'),
  /** Replace data that stored models, fits or batches were built on (they become stale). */
  confirmReplace: z.boolean().optional(),
});
export type DataUploadBody = z.input<typeof dataUploadBodySchema>;
export type ParsedDataUploadBody = z.output<typeof dataUploadBodySchema>;

// ---------- problems ----------
/** How problems name a wave file: 'wave "spring" (spring.csv)', or 'wave 2' without a label. */
export function waveFileTitle(label: string, position: number, fileName?: string): string {
  const base = label ? `wave "${label}"` : `wave ${position + 1}`;
  return fileName && fileName !== label ? `${base} (${fileName})` : base;
}
/** How problems name the fixed-pairs file. */
export function fixedPairsFileTitle(fileName?: string): string {
  return fileName ? `fixed-pairs file (${fileName})` : 'fixed-pairs file';
}
/** How problems name the actors file. */
export function actorsFileTitle(fileName?: string): string {
  return fileName ? `actors file (${fileName})` : 'actors file';
}

export interface DataProblem {
  /** The file's name, e.g. 'wave "spring" (spring.csv)' or 'actors file'; '' for the upload as a whole. */
  file: string;
  /** Line and column, counted from 1, when the problem has a place. */
  line?: number;
  column?: number;
  message: string;
}
/** details of a data_invalid error. */
export interface DataProblemDetails {
  problems: DataProblem[];
  /** True when more than MAX_PROBLEMS problems were found and only the first ones are listed. */
  truncated: boolean;
}

// ---------- responses ----------
export type CovariateKind = 'numeric' | 'categorical';

export interface NumericSummary {
  kind: 'numeric';
  /** The wave this column belongs to (changing covariates), or null for a constant one. */
  wave: number | null;
  observed: number;
  missing: number;
  min: number | null;
  max: number | null;
  mean: number | null;
}
export interface CategoricalSummary {
  kind: 'categorical';
  wave: number | null;
  observed: number;
  missing: number;
  /** Actors per category, in the order of `categories`. */
  counts: Record<string, number>;
}
export type CovariateSummary = NumericSummary | CategoricalSummary;

export interface CovariateInfo {
  name: string;
  kind: CovariateKind;
  changing: boolean;
  /** Sorted category labels (categorical only; empty for numeric). */
  categories: string[];
  /** One summary for a constant covariate, one per wave column for a changing one. */
  summaries: CovariateSummary[];
}

export interface WaveSummary {
  /** Wave number, from 1. */
  index: number;
  label: string;
  actors: number;
  ties: number;
  /** ties / observed ordered pairs. */
  density: number;
  /** Reciprocity index 2M/L: the share of ties (with an observed reverse pair) that are returned; null without such ties. */
  reciprocity: number | null;
  /** Ordered pairs (off the diagonal) not observed. */
  missing: number;
  /** Actors not present at this wave (only when the actors file has present@ columns). */
  absent?: number;
}

export interface WaveChange {
  from: number;
  to: number;
  /** Counted over pairs observed in both waves. */
  created: number;
  dissolved: number;
  stable: number;
  /** created + dissolved. */
  hamming: number;
  /** stable / (stable + created + dissolved); null when neither wave has a tie. */
  jaccard: number | null;
  /** A plain warning when the change is too large (Jaccard < 0.2) or there is none; else null. */
  caution: string | null;
}

export interface StudyDataResponse {
  hasData: boolean;
  format: DataFormat | null;
  uploadedAt: string | null;
  actors: string[];
  covariates: CovariateInfo[];
  waves: WaveSummary[];
  changes: WaveChange[];
  /** Pairs whose tie cannot change, from the fixed-pairs file (absent when there is none). */
  fixed?: FixedPairInfo[];
  /** Number of fixed pairs (sender, receiver), when there are any. */
  fixedPairs?: number;
  /** Per actor (actor order) and wave: present in the group; absent when the actors file has no present@ columns. */
  presence?: boolean[][];
}

export interface FixedPairInfo {
  sender: string;
  receiver: string;
  /** 0: never a tie; 1: always a tie. */
  value: 0 | 1;
  /** Waves (from 1) in which it is fixed. */
  waves: number[];
}

export interface DataUploadResponse extends StudyDataResponse {
  /** True when the upload replaced data stored before. */
  replaced: boolean;
  message: string;
}

export interface WaveTiesResponse {
  index: number;
  label: string;
  actors: string[];
  /** Ties as [sender, receiver] positions in `actors`. */
  ties: Array<[number, number]>;
  /** Pairs not observed, as [sender, receiver] positions. */
  missing: Array<[number, number]>;
}

// ---------- preview and replacing ----------

/** What replacing the stored data would touch. */
export interface DataReplaceInfo {
  /** The study has stored data that an upload would replace. */
  hasData: boolean;
  models: number;
  fits: number;
  batches: number;
  /** Fits and batches queued or running: replacing is refused until they end. */
  running: number;
  /** True when storing needs confirmReplace (models, fits or batches exist). */
  needsConfirmation: boolean;
  /** A plain sentence of what becomes stale, or null when nothing does. */
  stale: string | null;
}

/** The answer of POST .../data/preview: the same parser as the upload, nothing stored. */
export type DataPreviewResponse =
  | {
      ok: true;
      preview: Omit<StudyDataResponse, 'uploadedAt' | 'hasData'>;
      replace: DataReplaceInfo;
    }
  | {
      ok: false;
      message: string;
      problems: DataProblem[];
      truncated: boolean;
      replace: DataReplaceInfo;
    };

export interface DataLayoutResponse {
  actors: string[];
  /** One position in [0, 1] x [0, 1] per actor, from the union of every wave's ties (seeded, so stable). */
  positions: Array<[number, number]>;
}
