/**
 * Isobar's design tokens: the only place colours, spacing, type and radii are defined.
 * The palette is a deep harbour blue with a warm brass accent on a paper-white ground;
 * flag colours are always paired with text and an icon, never used alone.
 */
export const color = {
  ink: '#14202B',
  inkMuted: '#4A5866',
  inkFaint: '#7A8794',
  paper: '#F5F3EE',
  surface: '#FFFFFF',
  surfaceSunken: '#ECE9E1',
  line: '#D8D3C7',
  brand: '#17324A',
  brandStrong: '#0E2233',
  brandSoft: '#DCE6EE',
  accent: '#B8862F',
  accentSoft: '#F3E7CE',
  onBrand: '#FFFFFF',
  focus: '#2F7FC1',
  normal: '#2D6A4F',
  normalSoft: '#DDEEE4',
  borderline: '#8A5A00',
  borderlineSoft: '#F7EACB',
  abnormal: '#A4262C',
  abnormalSoft: '#F6DEDD',
} as const;

/** Spacing on a 4-point grid. */
export const space = {
  xxs: 2,
  xs: 4,
  sm: 8,
  md: 12,
  lg: 16,
  xl: 24,
  xxl: 32,
  xxxl: 48,
} as const;

export const radius = { sm: 4, md: 8, lg: 14, pill: 999 } as const;

export const font = {
  regular: 'PublicSans_400Regular',
  medium: 'PublicSans_500Medium',
  semibold: 'PublicSans_600SemiBold',
  bold: 'PublicSans_700Bold',
} as const;

/** Type scale: size and line height in px. */
export const type = {
  caption: { fontSize: 13, lineHeight: 18 },
  body: { fontSize: 16, lineHeight: 24 },
  lead: { fontSize: 18, lineHeight: 27 },
  title: { fontSize: 22, lineHeight: 28 },
  headline: { fontSize: 30, lineHeight: 36 },
  display: { fontSize: 44, lineHeight: 50 },
} as const;

/** Minimum touch target (px), for gloved hands. */
export const touchTarget = 44;

/** Breakpoints: phone first; `wide` switches to side navigation and two panes; `preview` has room for the form and the report preview side by side. */
export const breakpoint = { wide: 1024, preview: 1100 } as const;

/** Width of the centred reading column on wide screens. */
export const maxContentWidth = 1120;
