import { allow } from '../../../lib/api/http';
import { listOutbox } from '../../../lib/api/outbox';

export const GET = listOutbox;
export const ALL = allow('GET');
