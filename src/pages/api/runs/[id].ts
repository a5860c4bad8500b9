import { allow } from '../../../lib/api/http';
import { getRun } from '../../../lib/api/runs';

export const GET = getRun;
export const ALL = allow('GET');
