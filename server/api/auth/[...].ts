import CredentialsProviderModule from 'next-auth/providers/credentials'
import { NuxtAuthHandler } from '#auth'
import { signInWithLink, verifyPassword } from '../../utils/accounts/auth'
import { endSession, newSessionId, SESSION_MAX_AGE_S, sessionStands, sessionVersionOf } from '../../utils/accounts/sessions'

// next-auth providers are CommonJS; under ESM the factory sits on `.default`.
const CredentialsProvider
  = (CredentialsProviderModule as unknown as { default?: typeof CredentialsProviderModule }).default
    ?? CredentialsProviderModule

export default NuxtAuthHandler({
  secret: useRuntimeConfig().authSecret,
  session: { strategy: 'jwt', maxAge: SESSION_MAX_AGE_S },
  pages: { signIn: '/signin' },
  events: {
    async signOut ({ token }) {
      await endSession(token)
    }
  },
  providers: [
    CredentialsProvider({
      name: 'password',
      credentials: {
        email: { label: 'E-mail', type: 'email' },
        password: { label: 'Password', type: 'password' },
        linkToken: { label: 'Link token', type: 'text' }
      },
      /** Either a password, or the one-time token of an e-mailed sign-in link. */
      async authorize (credentials) {
        const c = credentials as { email?: string, password?: string, linkToken?: string } | undefined
        const user = c?.linkToken
          ? await signInWithLink(c.linkToken)
          : c?.email && c.password
            ? await verifyPassword(c.email, c.password)
            : null
        return user ? ({ id: user.id, name: user.name, email: user.email, role: user.role } as never) : null
      }
    })
  ],
  callbacks: {
    async jwt ({ token, user }) {
      if (user) {
        token.uid = user.id
        token.role = (user as unknown as { role: string }).role
        token.sid = newSessionId()
        token.sv = await sessionVersionOf(user.id)
        return token
      }
      // an ended session (signed out, reset, role changed) is refused here: next-auth then clears the cookie
      if (!(await sessionStands(token))) throw new Error('This session has ended')
      return token
    },
    session ({ session, token }) {
      if (session.user) Object.assign(session.user, { id: token.uid, role: token.role })
      return session
    }
  }
})
