import { createRun, listRuns } from '../../../../lib/api/runs';

export const GET = listRuns;
export const POST = createRun;
