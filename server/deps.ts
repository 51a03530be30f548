/** What every router is built from: the app's dependencies plus its auth helpers. */
import type { DataSource } from 'typeorm';
import type { Auth } from './auth/guard';
import type { Config } from './config';
import type { Mailer } from './mail/mailer';

export interface AppDeps {
  dataSource: DataSource;
  mailer: Mailer;
  config: Config;
}

export interface RouteDeps extends AppDeps {
  auth: Auth;
}
