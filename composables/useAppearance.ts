// Light or dark, per device: the person's choice kept in this browser (a setting of the device, not a record), or
// the phone's own setting (prefers-color-scheme) when they chose "follow the phone". The `dark` class on <html> is
// what Tailwind's darkMode: 'class' and assets/css/dark.css read.
export const APPEARANCES = ['system', 'light', 'dark'] as const
export type Appearance = (typeof APPEARANCES)[number]
export const APPEARANCE_KEY = 'forescent-appearance' // read before the first paint too (nuxt.config.ts)
export const APPEARANCE_LABELS: Record<Appearance, string> = { system: 'Follow the phone', light: 'Light', dark: 'Dark' }

function stored(): Appearance {
  try {
    const v = localStorage.getItem(APPEARANCE_KEY)
    return (APPEARANCES as readonly string[]).includes(v ?? '') ? v as Appearance : 'system'
  }
  catch { return 'system' }
}

/** Puts the `dark` class on <html> for this choice (the phone's setting for "system"). */
export function applyAppearance(mode: Appearance) {
  const dark = mode === 'dark' || (mode === 'system' && window.matchMedia?.('(prefers-color-scheme: dark)').matches)
  document.documentElement.classList.toggle('dark', !!dark)
}

export function useAppearance() {
  const mode = useState<Appearance>('appearance', () => 'system')
  if (import.meta.client) mode.value = stored()
  function set(next: Appearance) {
    mode.value = next
    try {
      if (next === 'system') localStorage.removeItem(APPEARANCE_KEY)
      else localStorage.setItem(APPEARANCE_KEY, next)
    }
    catch { /* private mode: the choice lasts for this page */ }
    applyAppearance(next)
  }
  return { mode, set }
}

export const storedAppearance = stored
