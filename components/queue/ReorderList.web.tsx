import { useState } from 'react';
import { colors } from '../theme';
import type { ReorderListProps } from './ReorderList';

export type { ReorderListProps } from './ReorderList';

/**
 * On the web the rows are dragged with the pointer (the browser's own drag
 * and drop); a line shows where the row will land. The up and down buttons
 * in each row keep working for the keyboard.
 */
export function ReorderList({ ids, onMove, renderItem, disabled, gap = 0, testID }: ReorderListProps) {
  const [dragging, setDragging] = useState<number | null>(null);
  const [over, setOver] = useState<number | null>(null);
  return (
    <div data-testid={testID} style={{ display: 'flex', flexDirection: 'column', gap }}>
      {ids.map((id, i) => (
        <div
          key={id}
          data-testid={testID ? `${testID}-row-${i}` : undefined}
          draggable={!disabled}
          onDragStart={(e) => {
            e.dataTransfer.effectAllowed = 'move';
            e.dataTransfer.setData('text/plain', String(i));
            setDragging(i);
          }}
          onDragOver={(e) => {
            if (dragging === null) return;
            e.preventDefault();
            e.dataTransfer.dropEffect = 'move';
            if (over !== i) setOver(i);
          }}
          onDragLeave={() => setOver((o) => (o === i ? null : o))}
          onDrop={(e) => {
            e.preventDefault();
            const from = dragging ?? Number(e.dataTransfer.getData('text/plain'));
            setDragging(null);
            setOver(null);
            if (Number.isInteger(from) && from !== i) onMove(from, i);
          }}
          onDragEnd={() => {
            setDragging(null);
            setOver(null);
          }}
          style={{
            cursor: disabled ? 'default' : 'grab',
            opacity: dragging === i ? 0.5 : 1,
            borderRadius: 14,
            outline: over === i && dragging !== null && dragging !== i ? `3px solid ${colors.ember}` : 'none',
            outlineOffset: 2,
          }}
        >
          {renderItem(id, i)}
        </div>
      ))}
    </div>
  );
}
