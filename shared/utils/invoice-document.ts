// What an issued invoice, credit note or receipt says, frozen at issue (pure: no database, no I/O). The PDF is drawn
// from this record alone, so an issued document reads the same every time, whatever changes in the settings later.
// Required content: Council Directive 2006/112/EC art. 226 (noted per field); the rest is common practice.
export interface FrozenParty {
  name: string // art. 226(5): full name of the supplier and of the customer
  tradingName?: string
  address: string[] // art. 226(5): their addresses
  country: string
  vatNumber?: string // art. 226(3) (supplier), 226(4) (customer, where it is liable)
  companyNumber?: string
  email?: string
  phone?: string
}

export interface FrozenLine {
  description: string // art. 226(6): the extent and nature of the services
  quantity: number // art. 226(6): the quantity
  unitMinor: number // art. 226(8): the unit price exclusive of VAT
  taxRateBasisPoints: number // art. 226(9): the VAT rate applied
  netMinor: number // art. 226(8): the taxable amount per rate
  taxMinor: number
  grossMinor: number
}

export interface FrozenInvoice {
  version: 1
  kind: 'invoice' | 'credit_note'
  number: string // art. 226(2): a sequential number, uniquely identifying the invoice
  issueDate: string // art. 226(1): the date of issue
  dueDate: string | null
  currency: string
  locale: string
  seller: FrozenParty & { logoId: string | null }
  buyer: FrozenParty
  lines: FrozenLine[]
  totals: { netMinor: number, taxMinor: number, grossMinor: number, byRate: Array<{ rateBasisPoints: number, netMinor: number, taxMinor: number }> } // art. 226(8), (10)
  payment: { terms: string, iban: string, bic: string, bankAccountText: string, reference: string }
  footer: string
  notes: string | null
  /** A credit note names the invoice it corrects (art. 219: a document amending the initial invoice refers to it). */
  corrects: { number: string, issueDate: string | null } | null
}

/** Taxable amount and tax per rate, lowest rate first (art. 226(8) and (10)). */
export function totalsByRate(lines: ReadonlyArray<Pick<FrozenLine, 'taxRateBasisPoints' | 'netMinor' | 'taxMinor'>>) {
  const by = new Map<number, { rateBasisPoints: number, netMinor: number, taxMinor: number }>()
  for (const l of lines) {
    const r = by.get(l.taxRateBasisPoints) ?? { rateBasisPoints: l.taxRateBasisPoints, netMinor: 0, taxMinor: 0 }
    r.netMinor += l.netMinor
    r.taxMinor += l.taxMinor
    by.set(l.taxRateBasisPoints, r)
  }
  return [...by.values()].sort((a, b) => a.rateBasisPoints - b.rateBasisPoints)
}

export interface BillingSource {
  personName: string
  addressLine: string | null
  town: string | null
  postcode: string | null
  billingName: string | null
  billingAddressLine: string | null
  billingTown: string | null
  billingPostcode: string | null
  billingCountry: string | null
}

/** Who an invoice is addressed to: the client's billing details, each empty one taken from the household's contact. */
export function billingParty(c: BillingSource, businessCountry: string): FrozenParty {
  const hasBillingAddress = !!c.billingAddressLine
  const address = (hasBillingAddress ? [c.billingAddressLine, c.billingTown, c.billingPostcode] : [c.addressLine, c.town, c.postcode])
    .map(s => (s ?? '').trim()).filter(Boolean)
  return { name: (c.billingName ?? '').trim() || c.personName, address, country: c.billingCountry || businessCountry }
}

export interface FreezeInput {
  kind: 'invoice' | 'credit_note'
  number: string
  issueDate: string
  dueDate: string | null
  currency: string
  locale: string
  seller: FrozenInvoice['seller']
  buyer: FrozenParty
  lines: FrozenLine[]
  payment: FrozenInvoice['payment']
  footer: string
  notes: string | null
  corrects: FrozenInvoice['corrects']
}

/** The frozen record of a document at issue. Its totals are the sum of its stored lines (they always agree). */
export function freezeInvoice(input: FreezeInput): FrozenInvoice {
  const lines = input.lines.map(l => ({ ...l }))
  const sum = (k: 'netMinor' | 'taxMinor' | 'grossMinor') => lines.reduce((a, l) => a + l[k], 0)
  return {
    version: 1, ...input, lines,
    seller: { ...input.seller, address: [...input.seller.address] },
    buyer: { ...input.buyer, address: [...input.buyer.address] },
    totals: { netMinor: sum('netMinor'), taxMinor: sum('taxMinor'), grossMinor: sum('grossMinor'), byRate: totalsByRate(lines) },
  }
}

/** A payment's plain receipt number, R-<invoice number>-<n> (n counts the invoice's payments from 1). */
export function receiptNumberFor(invoiceNumber: string, n: number): string {
  return `R-${invoiceNumber}-${n}`
}
