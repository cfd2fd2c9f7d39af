import { View } from 'react-native';
import { color } from './theme';

/**
 * Isobar's mark: three nested contour lines drawn off-centre, like lines of equal pressure on a chart.
 * Decorative, so hidden from screen readers (the product name is always written beside it).
 */
export function BrandMark({ size = 48, tone = color.brand }: { size?: number; tone?: string }) {
  const rings = [1, 0.7, 0.42];
  return (
    <View
      aria-hidden
      accessibilityElementsHidden
      importantForAccessibility="no-hide-descendants"
      style={{ width: size, height: size }}
    >
      {rings.map((scale, i) => {
        const d = size * scale;
        return (
          <View
            key={scale}
            style={{
              position: 'absolute',
              width: d,
              height: d,
              left: (size - d) * 0.62,
              top: (size - d) * 0.5,
              borderRadius: d / 2,
              borderWidth: Math.max(2, size / 16),
              borderColor: i === 2 ? color.accent : tone,
            }}
          />
        );
      })}
    </View>
  );
}
