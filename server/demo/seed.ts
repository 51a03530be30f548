/**
 * Demo data: the Harbourside volunteer rescue station (invented). One user per role and one study
 * with three waves of advice ties among 24 crew members and their covariates (./waves.ts), and on
 * request fitted models and batches for the review board (./results.ts).
 * Idempotent: re-running finds what exists and adds only what is missing. `npm run seed` runs it
 * (server/db/seed.ts).
 */
import type { DataSource } from 'typeorm';
import type { StudyRole } from '../../shared/api';
import { hashPassword } from '../auth/passwords';
import { DEFAULT_PASSWORD_HASH, type PasswordHashConfig } from '../config';
import { parseUpload } from '../data/parse';
import { replaceStudyData } from '../data/store';
import { dataUploadBodySchema } from '../../shared/data';
import { stopJobQueue } from '../jobs';
import { seedDemoResults, type DemoResults } from './results';
import { demoUpload } from './waves';
import { MembershipEntity } from '../team/entities';
import { StudyEntity } from '../studies/entities';
import { UserEntity } from '../auth/entities';
import { WaveEntity } from '../data/entities';

export const DEMO_PASSWORD = 'wavefit-demo-1';
export const DEMO_STUDY_NAME = 'Harbourside rescue station — advice ties';
export const DEMO_STUDY_DESCRIPTION =
  'Who asks whom for advice among the volunteer crew of the Harbourside sea-rescue station. ' +
  'The crew answered the same question three times over one season (spring, midsummer, early autumn). ' +
  'Covariates: years of service, watch team and whether the member is a certified skipper. Invented demo data.';

export interface DemoUser {
  email: string;
  name: string;
  /** Site admin, or the role in the demo study. */
  role: 'admin' | StudyRole;
}

export const DEMO_USERS: readonly DemoUser[] = [
  { email: 'admin@harbourside.example', name: 'Morgan Hale', role: 'admin' },
  { email: 'lead@harbourside.example', name: 'Ines Varga', role: 'lead' },
  { email: 'stats@harbourside.example', name: 'Tomasz Reyes', role: 'statistician' },
  { email: 'reviewer@harbourside.example', name: 'Aoife Lindqvist', role: 'reviewer' },
];

export interface SeedResult {
  studyId: number;
  /** What this run added (empty lists when everything existed already). */
  createdUsers: string[];
  createdStudy: boolean;
  /** True when this run stored the demo waves and covariates. */
  createdData: boolean;
  users: readonly DemoUser[];
  password: string;
  /** With options.withResults: the demo models, fits and batches (./results.ts). */
  results?: DemoResults;
}

export async function seedDemo(
  dataSource: DataSource,
  options: { passwordHash?: PasswordHashConfig; withResults?: boolean } = {},
): Promise<SeedResult> {
  const hashOptions = options.passwordHash ?? DEFAULT_PASSWORD_HASH;
  const users = dataSource.getRepository(UserEntity);
  const createdUsers: string[] = [];
  const ids = new Map<string, number>();
  for (const demo of DEMO_USERS) {
    let user = await users.findOneBy({ email: demo.email });
    if (!user) {
      user = await users.save({
        email: demo.email,
        name: demo.name,
        passwordHash: await hashPassword(DEMO_PASSWORD, hashOptions),
        isAdmin: demo.role === 'admin',
      });
      createdUsers.push(demo.email);
    }
    ids.set(demo.email, user.id);
  }

  const result = await dataSource.transaction(async (manager) => {
    const studies = manager.getRepository(StudyEntity);
    let study = await studies.findOneBy({ name: DEMO_STUDY_NAME });
    const createdStudy = !study;
    study ??= await studies.save({ name: DEMO_STUDY_NAME, description: DEMO_STUDY_DESCRIPTION });
    const memberships = manager.getRepository(MembershipEntity);
    for (const demo of DEMO_USERS) {
      if (demo.role === 'admin') continue;
      const userId = ids.get(demo.email)!;
      if (!(await memberships.existsBy({ userId, studyId: study.id }))) {
        await memberships.insert({ userId, studyId: study.id, role: demo.role });
      }
    }
    return { studyId: study.id, createdStudy };
  });

  // The waves go through the same parser and store as an upload.
  let createdData = false;
  if ((await dataSource.getRepository(WaveEntity).countBy({ studyId: result.studyId })) === 0) {
    const parsed = parseUpload(dataUploadBodySchema.parse(demoUpload()));
    if (!parsed.ok) throw new Error(`seed: the demo data do not parse: ${JSON.stringify(parsed.details.problems)}`);
    await replaceStudyData(dataSource, result.studyId, parsed.data);
    createdData = true;
  }

  // Fitted models and finished batches for the review board (about 10 s; off for the API tests).
  let results: DemoResults | undefined;
  if (options.withResults) {
    results = await seedDemoResults(dataSource, result.studyId);
    // Its queue stops here, so the server starts its own with its own options.
    await stopJobQueue(dataSource);
  }
  return { ...result, createdData, createdUsers, users: DEMO_USERS, password: DEMO_PASSWORD, results };
}

export function describeSeed(result: SeedResult): string {
  const lines = [
    `Demo study "${DEMO_STUDY_NAME}" (id ${result.studyId})${result.createdStudy ? ' created' : ' already there'}` +
      (result.createdData ? ', with its three waves of 24 crew members.' : '.'),
    `Demo sign-ins (password for all: ${result.password}):`,
    ...result.users.map((u) => `  ${u.role.padEnd(13)} ${u.email}`),
  ];
  return lines.join('\n');
}
