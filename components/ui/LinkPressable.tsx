import { router, type Href } from 'expo-router';
import { Pressable, type PressableProps } from 'react-native';

/**
 * A pressable surface that navigates. Unlike Link with asChild, the
 * pressable keeps its own state-driven style (pressed, hovered) on web.
 */
export function LinkPressable({ href, onPress, ...rest }: PressableProps & { href: Href }) {
  return (
    <Pressable
      accessibilityRole="link"
      {...rest}
      onPress={(e) => {
        onPress?.(e);
        router.navigate(href);
      }}
    />
  );
}
