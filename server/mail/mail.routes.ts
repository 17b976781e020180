import { z } from 'zod';
import { OutboxMessage } from '../../shared/sites';
import { notFound } from '../http/errors';
import { pathId } from '../http/path-id';
import { sendAttachment } from '../http/attachment';
import { defineRoute } from '../http/route';
import { getOutboxAttachment, getOutboxMessage, listOutbox } from './mailer';

export const mailRoutes = [
  defineRoute({
    method: 'get',
    path: '/api/mail/outbox',
    access: ['admin'],
    summary: 'Mail outbox, newest first',
    response: z.array(OutboxMessage),
    handler: ({ deps }) => listOutbox(deps.db),
  }),
  defineRoute({
    method: 'get',
    path: '/api/mail/outbox/:id',
    access: ['admin'],
    summary: 'One outbox message',
    response: OutboxMessage,
    handler: async ({ deps, params }) => (await getOutboxMessage(deps.db, pathId(params.id, 'Message'))) ?? Promise.reject(notFound('Message')),
  }),
  defineRoute({
    method: 'get',
    path: '/api/mail/outbox/:id/attachments/:index',
    access: ['admin'],
    summary: 'Download an attachment',
    handler: async ({ deps, params, res }) => {
      const a = await getOutboxAttachment(deps.db, pathId(params.id, 'Message'), pathId(params.index, 'Attachment', 0));
      if (!a) throw notFound('Attachment');
      return sendAttachment(res, a.content, a.contentType, a.filename);
    },
  }),
];
