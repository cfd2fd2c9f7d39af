import { Text as RNText, type TextProps } from 'react-native';
import { color, font, type } from '../theme';

type Variant = keyof typeof type;
type Weight = keyof typeof font;

export interface AppTextProps extends TextProps {
  variant?: Variant;
  weight?: Weight;
  tone?: 'ink' | 'muted' | 'faint' | 'onBrand' | 'brand' | 'abnormal';
}

const tones = {
  ink: color.ink,
  muted: color.inkMuted,
  faint: color.inkFaint,
  onBrand: color.onBrand,
  brand: color.brand,
  abnormal: color.abnormal,
} as const;

/** All text goes through here so type scale and font stay consistent. */
export function Text({ variant = 'body', weight = 'regular', tone = 'ink', style, ...rest }: AppTextProps) {
  return <RNText {...rest} style={[type[variant], { fontFamily: font[weight], color: tones[tone] }, style]} />;
}
