/** Theme choice in the browser: 'light', 'dark' or 'system', kept in localStorage. */
export type ThemeChoice = 'light' | 'dark' | 'system';
const KEY = 'skiplane-theme';

export function readThemeChoice(): ThemeChoice {
  const v = localStorage.getItem(KEY);
  return v === 'light' || v === 'dark' ? v : 'system';
}

export function effectiveTheme(choice: ThemeChoice): 'light' | 'dark' {
  if (choice !== 'system') return choice;
  return matchMedia('(prefers-color-scheme: dark)').matches ? 'dark' : 'light';
}

export function applyTheme(choice: ThemeChoice): void {
  if (choice === 'system') localStorage.removeItem(KEY);
  else localStorage.setItem(KEY, choice);
  document.documentElement.dataset.theme = effectiveTheme(choice);
  window.dispatchEvent(new CustomEvent('skiplane-theme', { detail: choice }));
}
