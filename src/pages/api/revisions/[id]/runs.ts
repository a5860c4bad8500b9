import { allow } from '../../../../lib/api/http';
import { createRun, listRuns } from '../../../../lib/api/runs';

export const GET = listRuns;
export const POST = createRun;
export const ALL = allow('GET', 'POST');
