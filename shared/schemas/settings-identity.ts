// The business's identity as printed on every invoice, credit note and receipt: who sells (legal and trading name,
// postal address, country), its tax and company numbers, how to pay it (bank details), its terms and footer.
// What an invoice must state comes from Council Directive 2006/112/EC art. 226 (the EU VAT directive); the UK's
// VAT rules ask much the same (from memory).
import { z } from 'zod'
import { electronicFormatIBAN, friendlyFormatIBAN, getCountrySpecifications, isValidBIC, isValidIBAN } from 'ibantools'
import { defineSetting } from './settings'

const text = (max: number) => z.string().trim().max(max, `Use at most ${max} characters.`).default('')
const COUNTRIES = getCountrySpecifications()

export const businessIdentitySchema = z.object({
  legalName: text(160), // art. 226(5): the supplier's full name
  tradingName: text(160),
  addressLine1: text(160), // art. 226(5): the supplier's address
  addressLine2: text(160),
  town: text(100),
  postcode: text(20),
  // ISO 3166-1 alpha-2, as ibantools lists the countries.
  country: z.string().trim().toUpperCase().refine(c => c === '' || c in COUNTRIES, 'Use a two-letter country code, like GB or DE (ISO 3166-1).').default(''),
  vatNumber: text(40), // art. 226(3): the supplier's VAT identification number
  companyNumber: text(40),
  // An IBAN is checked by its checksum (ISO 13616, through ibantools) and kept in its electronic form.
  iban: z.string().trim().transform(v => (v ? electronicFormatIBAN(v) ?? v : '')).refine(v => v === '' || isValidIBAN(v), 'This IBAN is not valid: check its letters and digits (its checksum does not match).').default(''),
  bic: z.string().trim().toUpperCase().refine(v => v === '' || isValidBIC(v), 'This BIC is not valid: it has 8 or 11 letters and digits, like NWBKGB2L.').default(''),
  // A local account format (UK sort code and account number, …) as the bank writes it.
  bankAccountText: text(200),
  paymentTerms: text(300),
  email: z.string().trim().max(254, 'Use at most 254 characters.').refine(v => v === '' || /^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(v), 'Enter an e-mail address like office@example.com.').default(''),
  phone: text(40),
})
export type BusinessIdentity = z.infer<typeof businessIdentitySchema>

export const BUSINESS_IDENTITY_KEY = 'business-identity'
// Empty until the office fills it in: invoices are not issued before the seller's name, address and country are set.
export const BUSINESS_IDENTITY_DEFAULTS: BusinessIdentity = {
  legalName: '', tradingName: '', addressLine1: '', addressLine2: '', town: '', postcode: '', country: '', vatNumber: '',
  companyNumber: '', iban: '', bic: '', bankAccountText: '', paymentTerms: '', email: '', phone: '',
}

export const businessIdentity = defineSetting(BUSINESS_IDENTITY_KEY, {
  label: 'Business identity (on invoices)',
  description: 'Who the invoices are from: the legal name, address and country, VAT and company numbers, bank details and payment terms. Issued invoices keep what was set when they were issued.',
  schema: businessIdentitySchema,
  defaults: BUSINESS_IDENTITY_DEFAULTS,
  fieldLabels: {
    legalName: 'Legal name', tradingName: 'Trading name (if different)', addressLine1: 'Address', addressLine2: 'Address (second line)',
    town: 'Town or city', postcode: 'Postcode', country: 'Country (two letters, e.g. GB)', vatNumber: 'VAT number',
    companyNumber: 'Company number (optional)', iban: 'IBAN', bic: 'BIC (SWIFT)', bankAccountText: 'Bank account (local format, e.g. sort code and account number)',
    paymentTerms: 'Payment terms', email: 'Billing e-mail', phone: 'Billing phone',
  },
})

/** What is missing before an invoice can be issued, as a sentence for the office (empty when complete). */
export function missingIdentity(id: BusinessIdentity): string[] {
  const missing: string[] = []
  if (!id.legalName) missing.push('the legal name')
  if (!id.addressLine1 || !id.town) missing.push('the postal address')
  if (!id.country) missing.push('the country')
  return missing
}

/** The IBAN in groups of four, as people read it. */
export function displayIban(iban: string): string {
  return iban ? friendlyFormatIBAN(iban) ?? iban : ''
}

/** The logo currently printed on new documents (by content hash; null for none). Set by its own upload route. */
export const BUSINESS_LOGO_KEY = 'business-logo'
export const businessLogoSchema = z.object({ logoId: z.string().max(64).nullable() })
