// The font embedded in our PDFs (server/assets/fonts, shipped with the app as a Nitro server asset) and the logo a
// document was frozen with (kept by content hash in business_logos, never changed).
import { eq } from 'drizzle-orm'
import { businessLogos } from '../database/schema'

let fonts: Promise<{ regular: Uint8Array, bold: Uint8Array }> | undefined

async function asset(name: string): Promise<Uint8Array> {
  const raw = await useStorage('assets:server').getItemRaw(`fonts/${name}`)
  if (!raw) throw new Error(`The PDF font ${name} is missing from the server's assets`)
  return raw instanceof Uint8Array ? raw : new Uint8Array(raw as ArrayBuffer)
}

export function pdfFonts() {
  fonts ??= Promise.all([asset('LiberationSans-Regular.ttf'), asset('LiberationSans-Bold.ttf')]).then(([regular, bold]) => ({ regular, bold }))
  return fonts
}

export async function pdfAssets(logoId: string | null) {
  const [f, logo] = await Promise.all([
    pdfFonts(),
    logoId ? useDb().select({ mime: businessLogos.mime, bytes: businessLogos.bytes }).from(businessLogos).where(eq(businessLogos.id, logoId)).limit(1).then(r => r[0] ?? null) : null,
  ])
  return { fonts: f, logo: logo ? { mime: logo.mime, bytes: new Uint8Array(logo.bytes) } : null }
}
