import { copyModuleSyncEntries } from './scripts/lib/nitro-fixes'
import { DEMO_AUTH_SECRET } from './server/utils/accounts/demo-secret'
import { cpSync, existsSync } from 'node:fs'
import { resolve } from 'node:path'

// https://nuxt.com/docs/api/nuxt-config
export default defineNuxtConfig({
  modules: ['@nuxtjs/tailwindcss', '@pinia/nuxt', '@sidebase/nuxt-auth', '@nuxt/eslint'],
  components: [{ path: '~/components', pathPrefix: false }],
  devtools: { enabled: false },
  app: {
    head: {
      htmlAttrs: { lang: 'en' },
      title: 'Crosspoint',
      titleTemplate: '%s · Crosspoint',
      meta: [
        { name: 'description', content: 'A shared, curated archive of electron-transfer rate measurements' },
        { name: 'viewport', content: 'width=device-width, initial-scale=1' }
      ],
      link: [{ rel: 'icon', type: 'image/svg+xml', href: '/favicon.svg' }]
    }
  },
  css: ['~/assets/css/main.css'],
  runtimeConfig: {
    databaseUrl: 'file:./data/crosspoint.db',
    databaseAuthToken: '',
    /** OAI-PMH: items per list response (then a resumption token), and the contact the Identify verb names */
    oaiPageSize: 100,
    oaiAdminEmail: 'curators@crosspoint.example',
    dataDir: './data',
    /** where stored files go: 'local' (dataDir) or 's3' (S3-compatible; without an endpoint a local fake S3 is started) */
    storageDriver: 'local',
    /** how often an instance looks for datasets other instances changed (search, systems) */
    searchSyncSeconds: 2,
    s3Endpoint: '',
    s3Region: 'us-east-1',
    s3Bucket: 'crosspoint',
    s3AccessKeyId: '',
    s3SecretAccessKey: '',
    s3Prefix: '',
    /** saved-search digests: each search is mailed at most once per this many hours (0: only on demand) */
    alertsEveryHours: 24,
    /** how often the schedule looks for searches that are due */
    alertsCheckMinutes: 15,
    authSecret: DEMO_AUTH_SECRET,
    smtpUrl: '',
    registrarUrl: '',
    registrarPrefix: '10.99999',
    // set NUXT_TRUST_PROXY=1 only behind a reverse proxy that writes X-Forwarded-For itself
    trustProxy: false,
    public: {
      baseUrl: 'http://localhost:3000',
      version: process.env.npm_package_version ?? '0.1.0'
    }
  },
  // static files (the built /_nuxt assets, fonts, favicon) are served before the server middleware runs:
  // they get their security headers here
  routeRules: {
    '/**': { headers: { 'x-content-type-options': 'nosniff', 'referrer-policy': 'same-origin', 'x-frame-options': 'DENY' } }
  },
  compatibilityDate: '2025-07-15',
  nitro: {
    experimental: { openAPI: true },
    openAPI: {
      production: 'runtime',
      route: '/_openapi.json',
      meta: { title: 'Crosspoint API', description: 'Public HTTP API of the Crosspoint electron-transfer rate archive', version: '1' },
      ui: { scalar: false, swagger: false }
    },
    hooks: {
      compiled (nitro) {
        // Migrations travel with the built server so that it can migrate from any working directory.
        const from = resolve(nitro.options.rootDir, 'drizzle')
        if (existsSync(from)) cpSync(from, resolve(nitro.options.output.serverDir, 'drizzle'), { recursive: true })
        // RDKit's WebAssembly file is read at run time, so the output tracer does not see it.
        const wasm = resolve(nitro.options.rootDir, 'node_modules/@rdkit/rdkit/dist/RDKit_minimal.wasm')
        if (existsSync(wasm)) cpSync(wasm, resolve(nitro.options.output.serverDir, 'node_modules/@rdkit/rdkit/dist/RDKit_minimal.wasm'))
        copyModuleSyncEntries(resolve(nitro.options.rootDir, 'node_modules'), resolve(nitro.options.output.serverDir, 'node_modules'))
      }
    }
  },
  typescript: { strict: true },
  telemetry: false,
  auth: {
    baseURL: '/api/auth',
    originEnvKey: 'AUTH_ORIGIN',
    globalAppMiddleware: false,
    provider: { type: 'authjs', trustHost: false, defaultProvider: 'credentials', addDefaultCallbackUrl: true }
  },
  // ESLint through Nuxt's flat-config integration; its stylistic rules are the one formatter (npm run lint:fix)
  eslint: { config: { stylistic: { indent: 2, quotes: 'single', semi: false, commaDangle: 'never' } } },
  tailwindcss: { cssPath: '~/assets/css/main.css', configPath: 'tailwind.config.ts', viewer: false }
})
