import { View } from 'react-native';

export type ReorderListProps = {
  ids: readonly string[];
  /** Move the item at `from` to `to`. */
  onMove: (from: number, to: number) => void;
  renderItem: (id: string, index: number) => React.ReactNode;
  disabled?: boolean;
  gap?: number;
  testID?: string;
};

/** Without a pointer to drag with, the rows' own up and down buttons reorder them. */
export function ReorderList({ ids, renderItem, gap, testID }: ReorderListProps) {
  return (
    <View style={{ gap }} testID={testID}>
      {ids.map((id, i) => (
        <View key={id}>{renderItem(id, i)}</View>
      ))}
    </View>
  );
}
