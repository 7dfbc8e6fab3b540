import { queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../lib/api';

export interface MessageSummary {
  id: string;
  receivedAt: string;
  from: string | null;
  to: string[];
  subject: string;
  hasHtml: boolean;
  attachmentCount: number;
}

export interface Message extends MessageSummary {
  text: string | null;
  html: string | null;
  attachments: { index: number; filename: string | null; contentType: string; size: number }[];
}

export const inboxKeys = {
  all: ['inbox'] as const,
  list: () => [...inboxKeys.all, 'list'] as const,
  message: (id: string) => [...inboxKeys.all, 'message', id] as const,
};

export const messagesQuery = () =>
  queryOptions({ queryKey: inboxKeys.list(), queryFn: () => api.get<{ messages: MessageSummary[] }>('/api/mail/messages').then((b) => b.messages), refetchInterval: 10_000 });
export const messageQuery = (id: string) =>
  queryOptions({ queryKey: inboxKeys.message(id), queryFn: () => api.get<{ message: Message }>(`/api/mail/messages/${encodeURIComponent(id)}`).then((b) => b.message) });

export const useMessages = () => useQuery(messagesQuery());
export const useMessage = (id: string | null) => useQuery({ ...messageQuery(id ?? ''), enabled: id !== null });

export const attachmentUrl = (id: string, index: number) => `/api/mail/messages/${encodeURIComponent(id)}/attachments/${index}`;
