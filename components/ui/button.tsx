import { Pressable, StyleSheet, type PressableProps } from 'react-native';
import { color, radius, space, touchTarget } from '../theme';
import { Text } from './text';

export interface ButtonProps extends Omit<PressableProps, 'children' | 'accessibilityLabel'> {
  /** Visible text; also the accessible name unless `accessibilityLabel` is given. */
  label: string;
  accessibilityLabel?: string;
  kind?: 'primary' | 'secondary';
  testID: string;
}

export function Button({ label, accessibilityLabel, kind = 'primary', disabled, style, ...rest }: ButtonProps) {
  const primary = kind === 'primary';
  return (
    <Pressable
      accessibilityRole="button"
      accessibilityLabel={accessibilityLabel ?? label}
      accessibilityState={{ disabled: !!disabled }}
      disabled={disabled}
      style={(state) => [
        styles.base,
        primary ? styles.primary : styles.secondary,
        state.pressed && (primary ? styles.primaryPressed : styles.secondaryPressed),
        disabled && styles.disabled,
        typeof style === 'function' ? style(state) : style,
      ]}
      {...rest}
    >
      <Text weight="semibold" tone={primary ? 'onBrand' : 'brand'}>
        {label}
      </Text>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  base: {
    minHeight: touchTarget,
    paddingHorizontal: space.xl,
    paddingVertical: space.md,
    borderRadius: radius.md,
    alignItems: 'center',
    justifyContent: 'center',
    borderWidth: 1,
  },
  primary: { backgroundColor: color.brand, borderColor: color.brand },
  primaryPressed: { backgroundColor: color.brandStrong },
  secondary: { backgroundColor: color.surface, borderColor: color.brand },
  secondaryPressed: { backgroundColor: color.brandSoft },
  disabled: { opacity: 0.5 },
});
