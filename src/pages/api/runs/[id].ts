import { getRun } from '../../../lib/api/runs';

export const GET = getRun;
