import type { QueryInterface } from 'sequelize';
import * as m0001 from './0001-auth-labs';

export type Migration = {
  name: string;
  up(q: QueryInterface): Promise<void>;
  down(q: QueryInterface): Promise<void>;
};

/** In order. A new migration is a new file here and one more line below. */
export const migrations: Migration[] = [{ name: '0001-auth-labs', ...m0001 }];
