import { listAudit } from '../../../../lib/api/audit';

export const GET = listAudit;
