import { useMemo, useState } from 'react';
import { Pressable, View, useWindowDimensions, type DimensionValue } from 'react-native';
import { tableLayoutOf } from './breakpoints';
import { Icon } from './icons';
import { sortRows, type SortDirection, type SortValue } from './sorting';
import { Text } from './Text';
import { colors } from './theme';
import { fonts, radius, rule, space, touchTarget } from './tokens';

export interface Column<R> {
  key: string;
  title: string;
  render: (row: R) => React.ReactNode;
  /** Makes the column sortable. */
  sortValue?: (row: R) => SortValue;
  /** Right-aligned figures. */
  numeric?: boolean;
  /** Relative width in the table layout (default 1). */
  flex?: number;
  minWidth?: DimensionValue;
  /** The first sort direction when this column is chosen (default ascending; dates often descending). */
  firstDirection?: SortDirection;
}

export interface TableProps<R> {
  /** Names the table for screen readers ("Your studies"). */
  label: string;
  columns: readonly Column<R>[];
  rows: readonly R[];
  rowKey: (row: R) => string | number;
  /** The column whose cell titles each card on a phone (default the first). */
  primaryKey?: string;
  initialSort?: { key: string; direction: SortDirection };
  testID?: string;
}

interface PressState {
  pressed: boolean;
  hovered?: boolean;
  focused?: boolean;
}
const focusRing = { outlineColor: colors.focus, outlineWidth: 2, outlineStyle: 'solid', outlineOffset: -2 } as const;

/**
 * A data table with sortable columns (a visible arrow on the sorted column, aria-sort on its
 * header). When its own width is phone-sized it reflows to a stack of cards with a sort picker.
 */
export function Table<R>({ label, columns, rows, rowKey, primaryKey, initialSort, testID }: TableProps<R>) {
  const window = useWindowDimensions();
  const [measured, setMeasured] = useState<number | null>(null);
  const [sort, setSort] = useState<{ key: string; direction: SortDirection } | null>(initialSort ?? null);
  const layout = tableLayoutOf(measured ?? window.width);

  const sorted = useMemo(() => {
    const col = sort ? columns.find((c) => c.key === sort.key) : undefined;
    return col?.sortValue ? sortRows(rows, col.sortValue, sort!.direction) : [...rows];
  }, [rows, columns, sort]);

  const choose = (col: Column<R>) => {
    setSort((prev) =>
      prev && prev.key === col.key
        ? { key: col.key, direction: prev.direction === 'ascending' ? 'descending' : 'ascending' }
        : { key: col.key, direction: col.firstDirection ?? 'ascending' },
    );
  };
  const directionWord = (d: SortDirection) => (d === 'ascending' ? 'ascending' : 'descending');
  const primary = columns.find((c) => c.key === primaryKey) ?? columns[0];

  return (
    <View testID={testID} onLayout={(e) => setMeasured(e.nativeEvent.layout.width)}>
      {layout === 'table' ? (
        <View
          role="table"
          accessibilityLabel={label}
          style={{ borderWidth: rule, borderColor: colors.rule, borderRadius: radius.md, backgroundColor: colors.surface, overflow: 'hidden' }}
        >
          <View role="row" style={{ flexDirection: 'row', backgroundColor: colors.surfaceSunk, borderBottomWidth: rule, borderBottomColor: colors.rule }}>
            {columns.map((col) => {
              const active = sort?.key === col.key;
              const ariaSort = active ? sort!.direction : col.sortValue ? 'none' : undefined;
              const titleStyle = { color: active ? colors.accent : colors.muted, fontFamily: fonts.textBold };
              return (
                <View
                  key={col.key}
                  role="columnheader"
                  aria-sort={ariaSort}
                  style={{ flex: col.flex ?? 1, flexBasis: 0, minWidth: col.minWidth ?? 0, justifyContent: 'center' }}
                >
                  {col.sortValue ? (
                    <Pressable
                      accessibilityRole="button"
                      accessibilityLabel={
                        active
                          ? `${col.title}, sorted ${directionWord(sort!.direction)}. Sort ${directionWord(sort!.direction === 'ascending' ? 'descending' : 'ascending')}`
                          : `Sort by ${col.title}`
                      }
                      onPress={() => choose(col)}
                      style={(s) => [
                        {
                          minHeight: touchTarget,
                          paddingHorizontal: space.s2,
                          flexDirection: 'row',
                          alignItems: 'center',
                          justifyContent: col.numeric ? 'flex-end' : 'flex-start',
                          gap: space.half,
                          backgroundColor: (s as PressState).hovered ? colors.rule : 'transparent',
                          cursor: 'pointer',
                        },
                        (s as PressState).focused ? focusRing : null,
                      ]}
                    >
                      <Text variant="label" style={titleStyle}>
                        {col.title}
                      </Text>
                      <Icon
                        name={active ? (sort!.direction === 'ascending' ? 'sortUp' : 'sortDown') : 'sortNone'}
                        size={16}
                        color={active ? colors.accent : colors.ruleStrong}
                      />
                    </Pressable>
                  ) : (
                    <Text variant="label" style={[titleStyle, { paddingHorizontal: space.s2, textAlign: col.numeric ? 'right' : 'left' }]}>
                      {col.title}
                    </Text>
                  )}
                </View>
              );
            })}
          </View>
          {sorted.map((row, i) => (
            <View
              key={rowKey(row)}
              role="row"
              style={{
                flexDirection: 'row',
                alignItems: 'center',
                minHeight: 52,
                borderTopWidth: i === 0 ? 0 : rule,
                borderTopColor: colors.rule,
              }}
            >
              {columns.map((col) => (
                <View
                  key={col.key}
                  role="cell"
                  style={{
                    flex: col.flex ?? 1,
                    flexBasis: 0,
                    minWidth: col.minWidth ?? 0,
                    overflow: 'hidden',
                    paddingHorizontal: space.s2,
                    paddingVertical: space.s1,
                    alignItems: col.numeric ? 'flex-end' : 'stretch',
                  }}
                >
                  {col.render(row)}
                </View>
              ))}
            </View>
          ))}
        </View>
      ) : (
        <View style={{ gap: space.s1 }}>
          {columns.some((c) => c.sortValue) ? (
            <View style={{ flexDirection: 'row', flexWrap: 'wrap', alignItems: 'center', gap: space.half }}>
              <Text variant="caption" style={{ width: '100%' }}>
                Sort by
              </Text>
              {columns
                .filter((c) => c.sortValue)
                .map((col) => {
                  const active = sort?.key === col.key;
                  return (
                    <Pressable
                      key={col.key}
                      accessibilityRole="button"
                      accessibilityLabel={
                        active ? `${col.title}, sorted ${directionWord(sort!.direction)}. Reverse the order` : `Sort by ${col.title}`
                      }
                      accessibilityState={{ selected: active }}
                      onPress={() => choose(col)}
                      style={(s) => [
                        {
                          minHeight: touchTarget,
                          paddingHorizontal: 10,
                          flexDirection: 'row',
                          alignItems: 'center',
                          gap: 2,
                          borderRadius: radius.pill,
                          borderWidth: 1,
                          borderColor: active ? colors.accent : colors.rule,
                          backgroundColor: active ? colors.accentSoft : (s as PressState).hovered ? colors.surfaceSunk : colors.surface,
                        },
                        (s as PressState).focused ? focusRing : null,
                      ]}
                    >
                      <Text variant="small" style={{ color: active ? colors.accent : colors.ink, fontFamily: active ? fonts.textBold : fonts.text }}>
                        {col.title}
                      </Text>
                      {active ? <Icon name={sort!.direction === 'ascending' ? 'sortUp' : 'sortDown'} size={16} color={colors.accent} /> : null}
                    </Pressable>
                  );
                })}
            </View>
          ) : null}
          <View role="list" accessibilityLabel={label} style={{ gap: space.s1 }}>
            {sorted.map((row) => (
              <View
                key={rowKey(row)}
                role="listitem"
                style={{
                  backgroundColor: colors.surface,
                  borderWidth: rule,
                  borderColor: colors.rule,
                  borderRadius: radius.md,
                  padding: space.s2,
                  gap: space.s1,
                }}
              >
                <View style={{ alignItems: 'stretch' }}>{primary.render(row)}</View>
                <View style={{ flexDirection: 'row', flexWrap: 'wrap', columnGap: space.s3, rowGap: space.s1 }}>
                  {columns
                    .filter((c) => c !== primary)
                    .map((col) => (
                      <View key={col.key} style={{ gap: 2, minWidth: 88 }}>
                        <Text variant="caption">{col.title}</Text>
                        {col.render(row)}
                      </View>
                    ))}
                </View>
              </View>
            ))}
          </View>
        </View>
      )}
    </View>
  );
}
