import { type GlobalThemeOverrides, type NLocale, createLocale, enUS } from 'naive-ui'
import { palette } from '../shared/charts/palette'
import { FONT_FAMILY } from '../shared/charts/svgMarkup'

/**
 * Ordinate's look, defined once: slate ink on warm paper, ochre kept for
 * warnings and targets. Colours come from the chart palette so the screens and
 * the exported plots agree.
 */
export const themeOverrides: GlobalThemeOverrides = {
  common: {
    fontFamily: FONT_FAMILY,
    fontFamilyMono: "ui-monospace, 'DejaVu Sans Mono', monospace",
    fontWeightStrong: '600',
    fontSize: '15px',
    fontSizeMedium: '15px',
    lineHeight: '1.55',
    borderRadius: '3px',
    borderRadiusSmall: '2px',
    primaryColor: palette.ink,
    primaryColorHover: palette.inkHover,
    primaryColorPressed: palette.inkPressed,
    primaryColorSuppl: palette.inkHover,
    infoColor: palette.ink,
    infoColorHover: palette.inkHover,
    infoColorPressed: palette.inkPressed,
    infoColorSuppl: palette.inkHover,
    warningColor: palette.ochre,
    warningColorHover: palette.ochreHover,
    warningColorPressed: palette.ochrePressed,
    warningColorSuppl: palette.ochreHover,
    errorColor: palette.brick,
    errorColorHover: palette.brickHover,
    errorColorPressed: palette.brickPressed,
    errorColorSuppl: palette.brickHover,
    successColor: palette.moss,
    successColorHover: palette.mossHover,
    successColorPressed: palette.mossPressed,
    successColorSuppl: palette.mossHover,
    bodyColor: palette.paper,
    cardColor: palette.surface,
    modalColor: palette.surface,
    popoverColor: palette.surface,
    tableColor: palette.surface,
    textColorBase: palette.text,
    textColor1: palette.text,
    textColor2: palette.text,
    textColor3: palette.textMuted,
    borderColor: palette.rule,
    dividerColor: palette.rule,
  },
  Card: {
    borderRadius: '4px',
  },
  DataTable: {
    thColor: palette.inkSoft,
    thFontWeight: '600',
  },
}

/**
 * Ordinate's own wording for the library's built-in texts, set once on the config provider
 * (App.vue): fields are named by their labels, so inputs carry no stock placeholder, and an
 * empty list or menu says so plainly.
 */
export const locale: NLocale = createLocale(
  {
    Input: { placeholder: '' },
    InputNumber: { placeholder: '' },
    Select: { placeholder: 'Choose…' },
    Cascader: { placeholder: 'Choose…', loading: 'Loading…' },
    Empty: { description: 'Nothing to show yet.' },
    DataTable: {
      checkTableAll: 'Tick every row',
      uncheckTableAll: 'Untick every row',
      confirm: 'Apply',
      clear: 'Clear',
    },
    Pagination: { goto: 'Go to page', selectionSuffix: 'rows a page' },
    Popconfirm: { positiveText: 'Yes', negativeText: 'Cancel' },
    Log: { loading: 'Loading…' },
  },
  enUS,
)

/**
 * The palette as CSS custom properties (`palette.textMuted` → `--ordinate-text-muted`), set on
 * the document root by App.vue, so component styles use `var(--ordinate-…)` instead of
 * repeating the colours.
 */
export const paletteCssVariables: Record<string, string> = Object.fromEntries(
  Object.entries(palette).map(([name, colour]) => [
    `--ordinate-${name.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`)}`,
    colour,
  ]),
)
