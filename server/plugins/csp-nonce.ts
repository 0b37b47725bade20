/** Adds the request's CSP nonce to every <script> the page renderer emits. */
export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('render:html', (html, { event }) => {
    const nonce = event.context.cspNonce as string | undefined
    if (!nonce) return
    const add = (parts: string[]) => parts.map(p => p.replace(/<script(?![^>]*\bnonce=)/g, `<script nonce="${nonce}"`))
    html.head = add(html.head)
    html.bodyPrepend = add(html.bodyPrepend)
    html.body = add(html.body)
    html.bodyAppend = add(html.bodyAppend)
  })
})
