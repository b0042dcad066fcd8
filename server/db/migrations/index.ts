import type { QueryInterface } from 'sequelize';
import * as m0001 from './0001-auth-labs';
import * as m0002 from './0002-parts-requests';
import * as m0003 from './0003-plans';
import * as m0004 from './0004-runs';
import * as m0005 from './0005-file-key-locks';
import * as m0006 from './0006-powder';
import * as m0007 from './0007-estimate-profile-fields';
import * as m0008 from './0008-floor-integrity';
import * as m0009 from './0009-mesh-jobs';
import * as m0010 from './0010-accounts-audit';
import * as m0011 from './0011-part-thumbnails';
import * as m0012 from './0012-lab-currency';
import * as m0013 from './0013-lab-density-rule';
import * as m0014 from './0014-mesh-job-tasks';
import * as m0015 from './0015-queue-moves';
import * as m0016 from './0016-part-revisions';
import * as m0017 from './0017-files-stored-uncompressed';

export type Migration = {
  name: string;
  up(q: QueryInterface): Promise<void>;
  down(q: QueryInterface): Promise<void>;
};

/** In order. A new migration is a new file here and one more line below. */
export const migrations: Migration[] = [
  { name: '0001-auth-labs', ...m0001 },
  { name: '0002-parts-requests', ...m0002 },
  { name: '0003-plans', ...m0003 },
  { name: '0004-runs', ...m0004 },
  { name: '0005-file-key-locks', ...m0005 },
  { name: '0006-powder', ...m0006 },
  { name: '0007-estimate-profile-fields', ...m0007 },
  { name: '0008-floor-integrity', ...m0008 },
  { name: '0009-mesh-jobs', ...m0009 },
  { name: '0010-accounts-audit', ...m0010 },
  { name: '0011-part-thumbnails', ...m0011 },
  { name: '0012-lab-currency', ...m0012 },
  { name: '0013-lab-density-rule', ...m0013 },
  { name: '0014-mesh-job-tasks', ...m0014 },
  { name: '0015-queue-moves', ...m0015 },
  { name: '0016-part-revisions', ...m0016 },
  { name: '0017-files-stored-uncompressed', ...m0017 },
];
