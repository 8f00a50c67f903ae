import { readFileSync, writeFileSync } from 'node:fs'
import { pdfPagePng, pdfText } from './tests/support/pdf'
const bytes = readFileSync(process.argv[2]!)
console.log(await pdfText(bytes))
writeFileSync(process.argv[3]!, await pdfPagePng(bytes))
