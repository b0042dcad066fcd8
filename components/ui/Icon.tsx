import Svg, { Circle, Path, Rect } from 'react-native-svg';

export type IconName = 'home' | 'parts' | 'requests' | 'plans' | 'queue' | 'floor' | 'settings' | 'review' | 'signOut' | 'chevron' | 'powder' | 'more';

/** Line icons drawn for Sinterstack on a 24 px grid. */
export function Icon({ name, size = 22, color }: { name: IconName; size?: number; color: string }) {
  const stroke = { stroke: color, strokeWidth: 1.8, strokeLinecap: 'round' as const, strokeLinejoin: 'round' as const, fill: 'none' };
  return (
    <Svg width={size} height={size} viewBox="0 0 24 24" accessibilityElementsHidden importantForAccessibility="no">
      {name === 'home' ? (
        <>
          <Path d="M4 11.5 12 5l8 6.5" {...stroke} />
          <Path d="M6.5 10v9h11v-9" {...stroke} />
          <Path d="M10.5 19v-4.5h3V19" {...stroke} />
        </>
      ) : null}
      {name === 'parts' ? (
        <>
          <Path d="M12 3.5 19.5 7.5v9L12 20.5 4.5 16.5v-9Z" {...stroke} />
          <Path d="M4.5 7.5 12 11.5l7.5-4M12 11.5v9" {...stroke} />
        </>
      ) : null}
      {name === 'requests' ? (
        <>
          <Rect x={5} y={4.5} width={14} height={16} rx={2} {...stroke} />
          <Path d="M9 4.5V3h6v1.5M8.5 10h7M8.5 13.5h7M8.5 17h4" {...stroke} />
        </>
      ) : null}
      {name === 'plans' ? (
        <>
          <Path d="M12 4 20 8l-8 4-8-4Z" {...stroke} />
          <Path d="M4 12l8 4 8-4M4 16l8 4 8-4" {...stroke} />
        </>
      ) : null}
      {name === 'queue' ? (
        <>
          <Path d="M4 5v14M4 19h16" {...stroke} />
          <Rect x={7} y={6} width={7} height={3} rx={1} {...stroke} />
          <Rect x={10} y={11} width={8} height={3} rx={1} {...stroke} />
          <Rect x={8} y={16} width={5} height={0.5} rx={0.25} {...stroke} />
        </>
      ) : null}
      {name === 'floor' ? (
        <>
          <Path d="M5 17a7 7 0 1 1 14 0" {...stroke} />
          <Path d="M12 17l3.5-5" {...stroke} />
          <Circle cx={12} cy={17} r={1.3} {...stroke} />
          <Path d="M4 20.5h16" {...stroke} />
        </>
      ) : null}
      {name === 'settings' ? (
        <>
          <Path d="M5 6h14M5 12h14M5 18h14" {...stroke} />
          <Circle cx={9} cy={6} r={1.9} {...stroke} fill={color} />
          <Circle cx={15} cy={12} r={1.9} {...stroke} fill={color} />
          <Circle cx={8} cy={18} r={1.9} {...stroke} fill={color} />
        </>
      ) : null}
      {name === 'review' ? (
        <>
          <Path d="M12 3.5 19 6.5v5c0 4.5-3 7.5-7 9-4-1.5-7-4.5-7-9v-5Z" {...stroke} />
          <Path d="M8.5 12l2.5 2.5 4.5-5" {...stroke} />
        </>
      ) : null}
      {name === 'signOut' ? (
        <>
          <Path d="M10 5H6v14h4" {...stroke} />
          <Path d="M14 8l4 4-4 4M18 12H9.5" {...stroke} />
        </>
      ) : null}
      {name === 'powder' ? (
        <>
          <Path d="M3.5 19.5h17" {...stroke} />
          <Path d="M5 19.5c1.5-5 4-8 7-8s5.5 3 7 8" {...stroke} />
          <Circle cx={12} cy={6} r={0.9} {...stroke} fill={color} />
          <Circle cx={8.5} cy={8} r={0.9} {...stroke} fill={color} />
          <Circle cx={15.5} cy={8} r={0.9} {...stroke} fill={color} />
        </>
      ) : null}
      {name === 'more' ? (
        <>
          <Rect x={4.5} y={4.5} width={6} height={6} rx={1.5} {...stroke} />
          <Rect x={13.5} y={4.5} width={6} height={6} rx={1.5} {...stroke} />
          <Rect x={4.5} y={13.5} width={6} height={6} rx={1.5} {...stroke} />
          <Rect x={13.5} y={13.5} width={6} height={6} rx={1.5} {...stroke} />
        </>
      ) : null}
      {name === 'chevron' ? <Path d="M9 6l6 6-6 6" {...stroke} /> : null}
    </Svg>
  );
}
