import { allow } from '../../../../lib/api/http';
import { listAudit } from '../../../../lib/api/audit';

export const GET = listAudit;
export const ALL = allow('GET');
