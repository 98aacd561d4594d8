// sidebase nuxt-auth's type files import from next-auth, which is not installed (the server side is
// @auth/core). These ambient modules point those names at @auth/core's types.
declare module 'next-auth' {
  export type Session = import('@auth/core/types').Session
  export type AuthOptions = import('@auth/core').AuthConfig
}

declare module 'next-auth/jwt' {
  export type JWT = import('@auth/core/jwt').JWT
  export type GetTokenParams = import('@auth/core/jwt').GetTokenParams
}

declare module 'next-auth/providers/index' {
  export type AppProvider = import('@auth/core/providers').Provider
  export type BuiltInProviderType = 'password' | 'link'
}
