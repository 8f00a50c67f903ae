// The pure parts of lawful invoices: the buyer from billing details or the contact, VAT per rate, money to refund,
// receipt numbers, and CSV as RFC 4180 writes it with the formula guard.
import { describe, expect, it } from 'vitest'
import { billingParty, receiptNumberFor, totalsByRate } from '../../shared/utils/invoice-document'
import { refundDue } from '../../shared/utils/invoices'
import { toCsv } from '../../shared/utils/csv'

const contact = { personName: 'Zoë Ångström-Łukasiewicz', addressLine: '3 Invented Lane', town: 'Ashcombe', postcode: 'AC1 1AA' }
const noBilling = { billingName: null, billingAddressLine: null, billingTown: null, billingPostcode: null, billingCountry: null }

describe('billingParty', () => {
  it('takes the household contact when no billing details are set, and the business country', () => {
    expect(billingParty({ ...contact, ...noBilling }, 'GB')).toEqual({ name: 'Zoë Ångström-Łukasiewicz', address: ['3 Invented Lane', 'Ashcombe', 'AC1 1AA'], country: 'GB' })
  })
  it('uses the billing name and address when set', () => {
    expect(billingParty({ ...contact, billingName: 'Family Trust', billingAddressLine: '1 Row', billingTown: 'Lyon', billingPostcode: null, billingCountry: 'FR' }, 'GB'))
      .toEqual({ name: 'Family Trust', address: ['1 Row', 'Lyon'], country: 'FR' })
  })
})

describe('totalsByRate', () => {
  it('sums the taxable amount and tax per rate, lowest rate first (art. 226(8), (10))', () => {
    expect(totalsByRate([
      { taxRateBasisPoints: 2000, netMinor: 1000, taxMinor: 200 }, { taxRateBasisPoints: 0, netMinor: 500, taxMinor: 0 }, { taxRateBasisPoints: 2000, netMinor: 250, taxMinor: 50 },
    ])).toEqual([{ rateBasisPoints: 0, netMinor: 500, taxMinor: 0 }, { rateBasisPoints: 2000, netMinor: 1250, taxMinor: 250 }])
  })
})

describe('refundDue', () => {
  const inv = { kind: 'invoice' as const, status: 'paid' as const, grossMinor: 10000, paidMinor: 10000, refundedMinor: 0 }
  it('is what was paid beyond the total, all of it on a voided invoice, and a credit note\'s amount', () => {
    expect(refundDue(inv)).toBe(0)
    expect(refundDue({ ...inv, paidMinor: 10200 })).toBe(200)
    expect(refundDue({ ...inv, paidMinor: 10200, refundedMinor: 200 })).toBe(0)
    expect(refundDue({ ...inv, status: 'void', paidMinor: 3000 })).toBe(3000)
    expect(refundDue({ kind: 'credit_note', status: 'open', grossMinor: -10000, paidMinor: 0, refundedMinor: 2500 })).toBe(7500)
    expect(refundDue({ kind: 'credit_note', status: 'paid', grossMinor: -10000, paidMinor: 0, refundedMinor: 0 })).toBe(0)
  })
})

describe('receipts and CSV', () => {
  it('numbers receipts plainly after their invoice', () => {
    expect(receiptNumberFor('INV-2026-0007', 2)).toBe('R-INV-2026-0007-2')
  })
  it('writes RFC 4180 (CRLF, quoted fields, doubled quotes) and neutralises formulas (OWASP "CSV Injection")', () => {
    expect(toCsv([['a', 'b'], ['x,y', 'say "hi"'], ['=1+1', '-2+3'], ['@SUM(A1)', null], ['-102.00', '+5']])).toBe('a,b\r\n"x,y","say ""hi"""\r\n\'=1+1,\'-2+3\r\n\'@SUM(A1),\r\n-102.00,+5\r\n')
  })
})
