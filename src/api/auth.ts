import { http } from './http'
import type { EmailVerified, InvitationAccepted, InvitationInfo, Me, UserAnswer } from './types'

export const authApi = {
  me: () => http.get<Me>('/me'),
  signIn: (email: string, password: string) => http.post<UserAnswer>('/auth/sign-in', { email, password }),
  signUp: (body: { email: string; password: string; name: string }) => http.post<UserAnswer>('/auth/sign-up', body),
  signOut: () => http.post<void>('/auth/sign-out'),
  requestReset: (email: string) => http.post<void>('/auth/password-reset', { email }),
  confirmReset: (token: string, password: string) => http.post<void>('/auth/password-reset/confirm', { token, password }),
  verifyEmail: (token: string) => http.post<EmailVerified>('/auth/verify-email', { token }),
  resendVerification: () => http.post<void>('/auth/verify-email/resend'),
  changeEmail: (email: string, password: string) => http.post<void>('/me/email', { email, password }),
  invitation: (token: string) => http.get<InvitationInfo>(`/invitations/${encodeURIComponent(token)}`),
  acceptInvitation: (token: string, body: { name?: string; password?: string }) =>
    http.post<InvitationAccepted>(`/invitations/${encodeURIComponent(token)}/accept`, body),
}
