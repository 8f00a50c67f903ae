// Draws the app's install icons from our own mark (public/favicon.svg) with the test browser: PNG at the sizes the
// W3C Web App Manifest's installability checks in Chromium ask for (192 and 512 px), a "maskable" one with the mark
// inside the safe zone (the inner 80 %, W3C Web App Manifest "purpose"), and a 180 px touch icon (from memory).
// Run with `npx tsx scripts/make-icons.ts` after changing the mark; the PNGs are committed.
import { readFileSync, writeFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { chromium } from '@playwright/test'

const root = resolve(import.meta.dirname, '..')
const svg = readFileSync(resolve(root, 'public/favicon.svg'), 'utf8')
const dataUrl = `data:image/svg+xml;base64,${Buffer.from(svg).toString('base64')}`
const browser = await chromium.launch({ executablePath: process.env.CHROMIUM_PATH || '/usr/bin/chromium' })
const page = await browser.newPage()
async function draw(size: number, file: string, maskable = false) {
  await page.setViewportSize({ width: size, height: size })
  // A maskable icon fills its square with the mark's green and keeps the mark within the safe zone.
  const inner = maskable ? Math.round(size * 0.7) : size
  await page.setContent(`<html><body style="margin:0;background:${maskable ? '#1f4d45' : 'transparent'};display:grid;place-items:center;width:${size}px;height:${size}px"><img src="${dataUrl}" width="${inner}" height="${inner}"></body></html>`)
  writeFileSync(resolve(root, 'public', file), await page.screenshot({ omitBackground: !maskable }))
}
await draw(192, 'icon-192.png')
await draw(512, 'icon-512.png')
await draw(512, 'icon-maskable-512.png', true)
await draw(180, 'apple-touch-icon.png', true)
await browser.close()
