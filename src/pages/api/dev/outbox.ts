import { listOutbox } from '../../../lib/api/outbox';

export const GET = listOutbox;
