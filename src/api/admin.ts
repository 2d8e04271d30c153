import { http } from './http'
import type { ItemList, OutboxItem, OutboxMessage } from './types'

export const adminApi = {
  outbox: () => http.get<ItemList<OutboxItem>>('/admin/outbox'),
  message: (id: number) => http.get<OutboxMessage>(`/admin/outbox/${id}`),
}
