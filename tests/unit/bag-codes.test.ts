import { describe, expect, it } from 'vitest'
import {
  DEVICE_NUMBERS, DEVICE_PREFIXES, choosePrefix, isPhoneBagCode, needsReservation, phoneBagCode, prefixOfPhoneCode, randomDevicePrefix,
  takePhoneCode, type DeviceCodes,
} from '../../shared/utils/bag-codes'
import { bagCode, isBagCode, seededRandom, type SampleKind } from '../../shared/utils/samples'

// Many phones, each making many codes with no signal: no two codes are ever the same.
describe('bag codes made on the phone', () => {
  it('have the kind letter, the phone prefix and a running number, one character longer than server codes', () => {
    expect(phoneBagCode('target', 'ABC', 0)).toBe('T-ABCAA')
    expect(phoneBagCode('control', 'ABC', DEVICE_NUMBERS - 1)).toBe('C-ABC99')
    expect(phoneBagCode('target', 'ABC', 32)).toBe('T-ABCBB')
    expect(isPhoneBagCode('T-ABCAA', 'target')).toBe(true)
    expect(isPhoneBagCode('T-ABCAA', 'control')).toBe(false)
    expect(isBagCode('T-ABCAA', 'target')).toBe(true)
    expect(isPhoneBagCode(bagCode('target', seededRandom(3)))).toBe(false) // a server-made code
    for (const bad of ['T-ABC0A', 'T-ABCA', 'T-ABCAAA', 'X-ABCAA', 't-abcaa', 42, null]) expect(isPhoneBagCode(bad)).toBe(false)
    expect(prefixOfPhoneCode('T-XYZ2D')).toBe('XYZ')
    expect(() => phoneBagCode('target', 'ABC', DEVICE_NUMBERS)).toThrow(RangeError)
    expect(() => phoneBagCode('target', 'AB0', 1)).toThrow(RangeError)
  })

  it('never repeat on one phone, and take a new prefix when the numbers of one run out', () => {
    let state: DeviceCodes | null = null
    const reserved: string[] = []
    const fresh = () => { const p = randomDevicePrefix(seededRandom(reserved.length + 1)); reserved.push(p); return { prefix: p, reserved: true, next: 0 } }
    const codes = new Set<string>()
    for (let i = 0; i < DEVICE_NUMBERS * 2 + 5; i++) {
      const out = takePhoneCode(state, i % 2 ? 'target' : 'control', fresh)
      codes.add(out.code.slice(2)) // without the kind letter: the number is never reused for the other kind either
      state = out.state
    }
    expect(codes.size).toBe(DEVICE_NUMBERS * 2 + 5)
    expect(reserved).toHaveLength(3)
  })

  it('from 300 phones with reserved prefixes, 450,000 codes made offline are all different', () => {
    // The server reserves each prefix once (choosePrefix against those already held), as POST /api/bag-code-prefixes.
    const held = new Set<string>()
    const rnd = seededRandom(2026)
    const reserve = (): DeviceCodes => {
      const p = choosePrefix(held, rnd)!
      held.add(p)
      return { prefix: p, reserved: true, next: 0 }
    }
    const phones: (DeviceCodes | null)[] = Array.from({ length: 300 }, () => null)
    const seen = new Set<string>()
    let made = 0
    // The phones take turns, as households collecting at the same time with no signal would.
    for (let round = 0; round < 1500; round++) {
      for (let i = 0; i < phones.length; i++) {
        const kind: SampleKind = (round + i) % 3 ? 'control' : 'target'
        const { code, state } = takePhoneCode(phones[i], kind, reserve)
        phones[i] = state
        if (!isPhoneBagCode(code, kind)) throw new Error(`not a phone code: ${code}`)
        seen.add(code)
        made++
      }
    }
    expect(made).toBe(450_000)
    expect(held.size).toBeGreaterThan(300) // each phone went through its first prefix and reserved more
    expect(seen.size).toBe(made)
  }, 30_000)

  it('the server hands out every prefix once, and says so when none is left', () => {
    const held = new Set<string>()
    const rnd = seededRandom(9)
    for (let i = 0; i < 5000; i++) {
      const p = choosePrefix(held, rnd)!
      if (held.has(p)) throw new Error(`handed out twice: ${p}`)
      held.add(p)
    }
    // All but three taken: those three come out (in order, once random tries keep missing), then none.
    const all = new Set<string>()
    while (all.size < DEVICE_PREFIXES) all.add(randomDevicePrefix(rnd))
    const left = [...all].slice(-3)
    for (const p of left) all.delete(p)
    const got = [choosePrefix(all, rnd, 2), null, null]
    all.add(got[0]!)
    got[1] = choosePrefix(all, rnd, 2); all.add(got[1]!)
    got[2] = choosePrefix(all, rnd, 2); all.add(got[2]!)
    expect(got.sort()).toEqual([...left].sort())
    expect(choosePrefix(all, rnd)).toBeNull()
  }, 20_000)

  it('a phone asks for a reserved prefix when it has none, only a random one, or one nearly used up', () => {
    expect(needsReservation(null)).toBe(true)
    expect(needsReservation({ prefix: 'ABC', reserved: false, next: 0 })).toBe(true)
    expect(needsReservation({ prefix: 'ABC', reserved: true, next: 3 })).toBe(false)
    expect(needsReservation({ prefix: 'ABC', reserved: true, next: DEVICE_NUMBERS - 1 })).toBe(true)
  })

  it('a broken stored state is replaced, never trusted', () => {
    const fresh = () => ({ prefix: 'XYZ', reserved: false, next: 0 })
    expect(takePhoneCode({ prefix: 'bad', reserved: true, next: 0 }, 'target', fresh).code).toBe('T-XYZAA')
    expect(takePhoneCode({ prefix: 'ABC', reserved: true, next: -1 }, 'target', fresh).code).toBe('T-XYZAA')
  })
})
