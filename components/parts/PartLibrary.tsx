import { useEffect, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { useLab } from '../lab/useCurrentLab';
import { useMaterialsQuery } from '../queries/materials';
import { usePartsQuery, type PartListParams } from '../queries/parts';
import { spacing, useContentWidth } from '../theme';
import { Button, EmptyState, ErrorState, Field, LoadingState, Notice, Screen, Text } from '../ui';
import { UploadPanel } from '../upload/UploadPanel';
import { Choice } from '../ui/Choice';
import { PART_CARDS_BELOW, PartTable, parseSort } from './PartTable';
import { WARNING_CODES, warningLabel } from './warnings';

const PAGE_SIZE = 25;

/** Who may upload and edit parts (the API's rule); everyone in the lab reads. */
export function canUploadParts(has: (role: 'designer' | 'planner' | 'lead') => boolean): boolean {
  return has('designer') || has('planner') || has('lead');
}

function useDebounced<T>(value: T, ms: number): T {
  const [v, setV] = useState(value);
  useEffect(() => {
    const t = setTimeout(() => setV(value), ms);
    return () => clearTimeout(t);
  }, [value, ms]);
  return v;
}

export function PartLibrary() {
  const lab = useLab();
  const width = useContentWidth();
  const canUpload = canUploadParts(lab.has);
  const materials = useMaterialsQuery(lab.id);
  const [searchText, setSearchText] = useState('');
  const search = useDebounced(searchText.trim(), 250);
  const [sort, setSort] = useState('-createdAt');
  const [materialId, setMaterialId] = useState<string>('all');
  const [warnings, setWarnings] = useState<string>('all');
  const [page, setPage] = useState(1);
  const [showFilters, setShowFilters] = useState(false);

  // A new search or filter starts again at the first page.
  useEffect(() => setPage(1), [search, sort, materialId, warnings]);

  const params: PartListParams = {
    search: search || undefined,
    sort,
    page,
    pageSize: PAGE_SIZE,
    materialId: materialId === 'all' ? undefined : materialId,
    warnings: warnings === 'all' ? undefined : warnings,
  };
  const parts = usePartsQuery(lab.id, params);
  // Whether the lab has any part at all, to tell an empty library from an empty search.
  const filtered = !!params.search || !!params.materialId || !!params.warnings;
  const total = parts.data?.total ?? 0;
  const pages = Math.max(1, Math.ceil(total / PAGE_SIZE));
  const cards = width < PART_CARDS_BELOW;
  const s = parseSort(sort);

  return (
    <Screen title="Parts" subtitle={`The part library of ${lab.name}: each mesh with its measured size, volume and warnings.`} testID="screen-parts">
      {canUpload ? (
        <UploadPanel labId={lab.id} />
      ) : (
        <Notice tone="info">Your roles in this lab let you read the library; designers, planners and leads upload and edit parts.</Notice>
      )}

      <View style={styles.controls}>
        <View style={styles.search}>
          <Field
            label="Search by name or tag"
            testID="parts-search"
            value={searchText}
            onChangeText={setSearchText}
            placeholder="bracket, gear, prototype…"
            autoCapitalize="none"
            autoCorrect={false}
          />
        </View>
        <Button
          label={showFilters ? 'Hide filters' : 'Filters'}
          variant="secondary"
          testID="parts-filters-toggle"
          onPress={() => setShowFilters((v) => !v)}
        />
      </View>
      {showFilters ? (
        <View style={styles.filters} testID="parts-filters">
          <Choice
            label="Material"
            testID="parts-filter-material"
            value={materialId}
            onChange={setMaterialId}
            options={[
              { value: 'all', label: 'Any' },
              { value: 'none', label: 'No default' },
              ...(materials.data ?? []).map((m) => ({ value: m.id, label: m.name, testID: `parts-filter-material-${m.id}` })),
            ]}
          />
          <Choice
            label="Warnings"
            testID="parts-filter-warnings"
            value={warnings}
            onChange={setWarnings}
            options={[
              { value: 'all', label: 'All parts' },
              { value: 'any', label: 'With warnings' },
              { value: 'none', label: 'Without' },
              ...WARNING_CODES.map((c) => ({ value: c, label: warningLabel(c) })),
            ]}
          />
        </View>
      ) : null}
      {cards ? (
        <Choice
          label="Sort"
          testID="parts-sort"
          value={s.key}
          onChange={(key) => setSort(key === 'name' || key === 'material' ? key : `-${key}`)}
          options={[
            { value: 'createdAt', label: 'Newest' },
            { value: 'name', label: 'Name' },
            { value: 'volume', label: 'Volume' },
            { value: 'sizeZ', label: 'Height' },
            { value: 'timesUsed', label: 'Most used' },
          ]}
        />
      ) : null}

      {parts.isPending ? (
        <LoadingState label="Loading parts…" />
      ) : parts.isError ? (
        <ErrorState error={parts.error} onRetry={() => parts.refetch()} />
      ) : parts.data.items.length === 0 ? (
        filtered ? (
          <EmptyState
            testID="parts-none-match"
            title="No part matches"
            body="No part of the library has this name or tag, or passes these filters. Clear the search or the filters to see every part."
          />
        ) : (
          <EmptyState
            testID="parts-empty"
            title="No parts yet"
            body="Designers upload STL, OBJ or 3MF files here. Each part is measured on upload (bounding box, volume, surface area, shells, watertightness) and flagged when it is open, thin or too big for every machine of the lab."
            who="Filled by designers; read by planners when they pack builds."
          />
        )
      ) : (
        <View style={styles.results}>
          <Text variant="label" color="inkMuted" testID="parts-total">
            {total === 1 ? '1 part' : `${total.toLocaleString('en-US')} parts`}
            {pages > 1 ? ` · page ${page} of ${pages}` : ''}
            {parts.isFetching ? ' · updating…' : ''}
          </Text>
          <PartTable parts={parts.data.items} cards={cards} sort={sort} onSort={setSort} />
          {pages > 1 ? (
            <View style={styles.pager}>
              <Button label="Previous" variant="secondary" size="sm" disabled={page <= 1} onPress={() => setPage((p) => Math.max(1, p - 1))} testID="parts-prev" />
              <Button label="Next" variant="secondary" size="sm" disabled={page >= pages} onPress={() => setPage((p) => Math.min(pages, p + 1))} testID="parts-next" />
            </View>
          ) : null}
        </View>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  controls: { flexDirection: 'row', alignItems: 'flex-end', gap: spacing.md, flexWrap: 'wrap' },
  search: { flexGrow: 1, flexBasis: 240 },
  filters: { gap: spacing.md },
  results: { gap: spacing.sm },
  pager: { flexDirection: 'row', gap: spacing.sm },
});
