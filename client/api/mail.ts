import { OutboxMessage } from '@shared/sites';
import { http } from './http';

export const listOutbox = () => http('GET', '/api/mail/outbox', OutboxMessage.array());
export const getOutboxMessage = (id: number) => http('GET', `/api/mail/outbox/${id}`, OutboxMessage);
