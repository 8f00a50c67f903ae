// Looks at a PDF as a person would: prints its text (read by PDF.js) and writes page 1 as a PNG.
// Run: npx tsx scripts/pdf-png.ts invoice.pdf invoice.png
import { readFileSync, writeFileSync } from 'node:fs'
import { pdfPagePng, pdfText } from '../tests/support/pdf'
const bytes = readFileSync(process.argv[2]!)
console.log(await pdfText(bytes))
writeFileSync(process.argv[3]!, await pdfPagePng(bytes))
