import { beforeEach, describe, expect, it, vi } from 'vitest'
import { createPinia, setActivePinia } from 'pinia'
import { ApiProblem } from '../../../../src/api/http'

const me = vi.fn()
const signIn = vi.fn()
const signUp = vi.fn()
vi.mock('../../../../src/api/auth', () => ({ authApi: { me: () => me(), signIn: (...a: unknown[]) => signIn(...a), signUp: (...a: unknown[]) => signUp(...a), signOut: vi.fn(async () => undefined) } }))

const { useSessionStore } = await import('../../../../src/stores/session')

describe('session store', () => {
  beforeEach(() => { setActivePinia(createPinia()); me.mockReset(); signIn.mockReset(); signUp.mockReset() })

  it('treats 401 from /me as signed out, not as an error', async () => {
    me.mockRejectedValue(new ApiProblem({ status: 401, title: 'Unauthorized' }))
    const s = useSessionStore()
    await expect(s.load()).resolves.toBeNull()
    expect(s.loaded).toBe(true)
    expect(s.signedIn).toBe(false)
  })

  it('asks the server once for concurrent loads and knows the project roles', async () => {
    me.mockResolvedValue({ id: 'u1', email: 'o@example.org', name: 'O', isSiteAdmin: false, projects: [{ id: 'p1', name: 'P', role: 'viewer' }] })
    const s = useSessionStore()
    await Promise.all([s.load(), s.load()])
    expect(me).toHaveBeenCalledTimes(1)
    expect(s.roleIn('p1')).toBe('viewer')
    expect(s.roleIn('p2')).toBeNull()
  })

  it('reloads the user after signing in', async () => {
    signIn.mockResolvedValue({ user: {} })
    me.mockResolvedValue({ id: 'u1', email: 'a@example.org', name: 'A', isSiteAdmin: true, projects: [] })
    const s = useSessionStore()
    await s.signIn('a@example.org', 'secret-password')
    expect(signIn).toHaveBeenCalledWith('a@example.org', 'secret-password')
    expect(s.isSiteAdmin).toBe(true)
  })

  it('signs in after signing up; when the address already had an account, it says to look in the mailbox', async () => {
    signUp.mockResolvedValue({ user: {} })
    signIn.mockResolvedValue({ user: {} })
    me.mockResolvedValue({ id: 'u1', email: 'n@example.org', name: 'N', isSiteAdmin: false, emailVerified: false, projects: [] })
    const s = useSessionStore()
    await expect(s.signUp({ email: 'n@example.org', password: 'a long enough password', name: 'N' })).resolves.toBe('signed-in')
    expect(signIn).toHaveBeenCalledWith('n@example.org', 'a long enough password')
    expect(s.me?.emailVerified).toBe(false)

    setActivePinia(createPinia())
    signIn.mockRejectedValue(new ApiProblem({ status: 401, title: 'Unauthorized' }))
    const t = useSessionStore()
    await expect(t.signUp({ email: 'taken@example.org', password: 'a long enough password', name: 'T' })).resolves.toBe('check-mail')
    expect(t.signedIn).toBe(false)
  })
})
