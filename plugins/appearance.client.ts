// Keeps the appearance in step: the choice kept on this device, or the phone's setting as it changes (a phone
// switching to dark at sunset switches Forescent too).
export default defineNuxtPlugin(() => {
  applyAppearance(storedAppearance())
  window.matchMedia?.('(prefers-color-scheme: dark)').addEventListener('change', () => applyAppearance(storedAppearance()))
})
