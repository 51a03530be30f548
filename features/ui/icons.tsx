/**
 * Wavefit's own small icon set, drawn on a 24-unit grid with round 1.75-unit strokes.
 * Icons are decorative: a word always travels with them, so they are hidden from screen readers.
 */
import Svg, { Circle, Path, Rect } from 'react-native-svg';
import { colors } from './theme';

export type IconName =
  | 'info'
  | 'caution'
  | 'error'
  | 'pass'
  | 'fail'
  | 'unsure'
  | 'studies'
  | 'team'
  | 'account'
  | 'outbox'
  | 'plus'
  | 'sortUp'
  | 'sortDown'
  | 'sortNone'
  | 'chevronRight'
  | 'back'
  | 'signOut'
  | 'mail'
  | 'trash';

export interface IconProps {
  name: IconName;
  size?: number;
  color?: string;
}

export function Icon({ name, size = 20, color = colors.ink }: IconProps) {
  const stroke = { stroke: color, strokeWidth: 1.75, strokeLinecap: 'round' as const, strokeLinejoin: 'round' as const, fill: 'none' };
  const dot = (cx: number, cy: number) => <Circle cx={cx} cy={cy} r={1.2} fill={color} />;
  let body: React.ReactNode;
  switch (name) {
    case 'info':
      body = (
        <>
          <Circle cx={12} cy={12} r={9} {...stroke} />
          <Path d="M12 11v6" {...stroke} />
          {dot(12, 7.8)}
        </>
      );
      break;
    case 'caution':
      body = (
        <>
          <Path d="M12 3.5 21.5 20h-19z" {...stroke} />
          <Path d="M12 9.5v4.8" {...stroke} />
          {dot(12, 17)}
        </>
      );
      break;
    case 'error':
      body = (
        <>
          <Path d="M8.3 3h7.4L21 8.3v7.4L15.7 21H8.3L3 15.7V8.3z" {...stroke} />
          <Path d="M12 7.5v5.5" {...stroke} />
          {dot(12, 16.3)}
        </>
      );
      break;
    case 'pass':
      body = (
        <>
          <Circle cx={12} cy={12} r={9} {...stroke} />
          <Path d="m8 12.4 2.8 2.8L16.2 9.6" {...stroke} />
        </>
      );
      break;
    case 'fail':
      body = (
        <>
          <Circle cx={12} cy={12} r={9} {...stroke} />
          <Path d="m9 9 6 6M15 9l-6 6" {...stroke} />
        </>
      );
      break;
    case 'unsure':
      body = (
        <>
          <Circle cx={12} cy={12} r={9} {...stroke} />
          <Path d="M9.6 9.6a2.5 2.5 0 1 1 3.4 2.3c-.7.3-1 .8-1 1.5v.5" {...stroke} />
          {dot(12, 16.6)}
        </>
      );
      break;
    case 'studies':
      body = (
        <>
          <Rect x={3.5} y={8} width={17} height={12} rx={2} {...stroke} />
          <Path d="M6 5h12" {...stroke} />
          <Path d="M6.5 14c1.5-2 2.8-2 4.2 0s2.8 2 4.2 0" {...stroke} />
        </>
      );
      break;
    case 'team':
      body = (
        <>
          <Circle cx={9} cy={8.5} r={3} {...stroke} />
          <Path d="M3.5 19c0-3 2.4-5 5.5-5s5.5 2 5.5 5" {...stroke} />
          <Circle cx={16.5} cy={9.5} r={2.4} {...stroke} />
          <Path d="M16 14.2c2.7.2 4.6 1.9 4.6 4.8" {...stroke} />
        </>
      );
      break;
    case 'account':
      body = (
        <>
          <Circle cx={12} cy={8.5} r={3.5} {...stroke} />
          <Path d="M5 20c0-3.9 3.1-6.5 7-6.5s7 2.6 7 6.5" {...stroke} />
        </>
      );
      break;
    case 'outbox':
      body = (
        <>
          <Path d="M3 13.5 5.5 5h13l2.5 8.5V19H3z" {...stroke} />
          <Path d="M3 13.5h5l1.5 2.5h5l1.5-2.5h5" {...stroke} />
        </>
      );
      break;
    case 'plus':
      body = <Path d="M12 5v14M5 12h14" {...stroke} />;
      break;
    case 'sortUp':
      body = <Path d="M7 14.5 12 9l5 5.5z" fill={color} />;
      break;
    case 'sortDown':
      body = <Path d="M7 9.5 12 15l5-5.5z" fill={color} />;
      break;
    case 'sortNone':
      body = <Path d="M8.5 10 12 6.5l3.5 3.5zM8.5 14 12 17.5l3.5-3.5z" fill={color} />;
      break;
    case 'chevronRight':
      body = <Path d="m9.5 6 6 6-6 6" {...stroke} />;
      break;
    case 'back':
      body = <Path d="M19 12H5m6-6-6 6 6 6" {...stroke} />;
      break;
    case 'signOut':
      body = (
        <>
          <Path d="M10 4.5H5v15h5" {...stroke} />
          <Path d="m15 8 4 4-4 4M19 12H9.5" {...stroke} />
        </>
      );
      break;
    case 'mail':
      body = (
        <>
          <Rect x={3} y={5.5} width={18} height={13} rx={2} {...stroke} />
          <Path d="m3.5 7 8.5 6.5L20.5 7" {...stroke} />
        </>
      );
      break;
    case 'trash':
      body = (
        <>
          <Path d="M4.5 7h15M9.5 7V4.5h5V7M6.5 7l1 12.5h9l1-12.5" {...stroke} />
        </>
      );
      break;
  }
  return (
    <Svg width={size} height={size} viewBox="0 0 24 24" aria-hidden accessibilityElementsHidden importantForAccessibility="no-hide-descendants">
      {body}
    </Svg>
  );
}
