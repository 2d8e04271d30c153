import { http } from './http'
import type { InvitationInfo, Me } from './types'

export const authApi = {
  me: () => http.get<Me>('/me'),
  signIn: (email: string, password: string) => http.post<{ user: unknown }>('/auth/sign-in', { email, password }),
  signUp: (body: { email: string; password: string; name: string }) => http.post<{ user: unknown }>('/auth/sign-up', body),
  signOut: () => http.post<void>('/auth/sign-out'),
  requestReset: (email: string) => http.post<void>('/auth/password-reset', { email }),
  confirmReset: (token: string, password: string) => http.post<void>('/auth/password-reset/confirm', { token, password }),
  verifyEmail: (token: string) => http.post<{ email: string; changed: boolean }>('/auth/verify-email', { token }),
  resendVerification: () => http.post<void>('/auth/verify-email/resend'),
  changeEmail: (email: string, password: string) => http.post<void>('/me/email', { email, password }),
  invitation: (token: string) => http.get<InvitationInfo>(`/invitations/${encodeURIComponent(token)}`),
  acceptInvitation: (token: string, body: { name?: string; password?: string }) =>
    http.post<{ projectId: string }>(`/invitations/${encodeURIComponent(token)}/accept`, body),
}
