import { http } from './http'
import type { ApiKey, CreatedApiKey, ItemList } from './types'

export interface NewApiKey { name: string; projectId?: string; access: 'read' | 'write'; expiresAt?: string }

export const keysApi = {
  list: () => http.get<ItemList<ApiKey>>('/me/api-keys'),
  create: (body: NewApiKey) => http.post<CreatedApiKey>('/me/api-keys', body),
  revoke: (id: string) => http.delete(`/me/api-keys/${encodeURIComponent(id)}`),
}
