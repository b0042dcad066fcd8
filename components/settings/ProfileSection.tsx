import { router } from 'expo-router';
import type { z } from 'zod';
import type { labResource } from '../queries/labResource';
import { useLab } from '../lab/useCurrentLab';
import { useLabCurrency } from '../queries/account';
import { Button, EmptyState, ErrorState, Figure, LoadingState, Table, Text, type Column } from '../ui';
import { profileFields } from './pickProfile';
import { emptyValues, valuesFrom, withCurrency, type FieldGroup } from './profileForm';
import { DeleteProfile, ProfileBack } from './ProfileParts';
import { ProfileForm } from './ProfileForm';
import { SettingsScreen } from './SettingsScreen';

type StoredProfile = { id: string; name: string; updatedAt: string };
type ProfileNoun = 'machine' | 'material';

/**
 * What differs between the lab's machines and its materials: the noun, the
 * table columns, the form's fields and schema, a few texts and the hooks of
 * the resource. Everything else about the list, add and edit screens is one.
 */
export type ProfileKind<Item extends StoredProfile, P extends object> = {
  /** Gives the texts ("Add machine"), the routes (/settings/machines) and the testIDs (machine-add). */
  kind: ProfileNoun;
  subtitle: string;
  emptyBody: string;
  columns: Column<Item>[];
  groups: FieldGroup[];
  schema: z.ZodType<P>;
  /** Values a new profile's form starts with (the rest start empty). */
  defaults?: Partial<P>;
  queries: Omit<ReturnType<typeof labResource<Item, P>>, 'keys'>;
};

const capitalised = (word: string) => word[0].toUpperCase() + word.slice(1);
const listPath = (kind: ProfileNoun) => `/settings/${kind}s` as const;

/** The name column leads every profile table. */
export function nameColumn<Item extends StoredProfile>(): Column<Item> {
  return { key: 'name', title: 'Name', flex: 2, render: (m) => <Text variant="bodyStrong">{m.name}</Text> };
}

export function ProfileList<Item extends StoredProfile, P extends object>({ kind: profile }: { kind: ProfileKind<Item, P> }) {
  const { kind } = profile;
  const lab = useLab();
  const list = profile.queries.useListQuery(lab.id);
  const currency = useLabCurrency(lab.id);
  return (
    <SettingsScreen
      title={capitalised(`${kind}s`)}
      subtitle={profile.subtitle}
      testID={`settings-${kind}s`}
      actions={lab.isLead ? <Button label={`Add ${kind}`} testID={`${kind}-add`} onPress={() => router.push(`${listPath(kind)}/new`)} /> : null}
    >
      {list.isPending ? (
        <LoadingState label={`Loading ${kind}s…`} />
      ) : list.isError ? (
        <ErrorState error={list.error} onRetry={() => list.refetch()} />
      ) : (
        <Table
          testID={`${kind}s-table`}
          columns={profile.columns.map((c) => ({ ...c, title: withCurrency(c.title, currency) }))}
          rows={list.data}
          rowKey={(m) => m.id}
          rowTestID={(m) => `${kind}-row-${m.id}`}
          onRowPress={(m) => router.push(`${listPath(kind)}/${m.id}`)}
          empty={
            <EmptyState
              title={`No ${kind}s yet`}
              body={profile.emptyBody}
              who={lab.isLead ? 'You add them as a lead.' : 'Added by the lab’s leads.'}
            />
          }
        />
      )}
    </SettingsScreen>
  );
}

export function NewProfile<Item extends StoredProfile, P extends object>({ kind: profile }: { kind: ProfileKind<Item, P> }) {
  const { kind } = profile;
  const lab = useLab();
  const create = profile.queries.useCreateMutation(lab.id);
  return (
    <SettingsScreen title={`Add ${kind}`} testID={`settings-${kind}-new`}>
      <ProfileBack href={listPath(kind)} label={`All ${kind}s`} />
      {lab.isLead ? (
        <ProfileForm<P>
          groups={profile.groups}
          schema={profile.schema}
          initial={profile.defaults ? { ...emptyValues(profile.groups), ...valuesFrom(profile.groups.map((g) => ({ ...g, fields: g.fields.filter((f) => f.key in profile.defaults!) })), profile.defaults) } : emptyValues(profile.groups)}
          submitLabel={`Add ${kind}`}
          testIDPrefix={kind}
          submitting={create.isPending}
          serverError={create.error}
          onSubmit={(input) => create.mutate(input, { onSuccess: () => router.replace(listPath(kind)) })}
        />
      ) : (
        <Figure color="inkMuted">{`Only leads add ${kind}s.`}</Figure>
      )}
    </SettingsScreen>
  );
}

export function EditProfile<Item extends StoredProfile, P extends object>({ kind: profile, id }: { kind: ProfileKind<Item, P>; id: string }) {
  const { kind } = profile;
  const lab = useLab();
  const item = profile.queries.useOneQuery(lab.id, id);
  const update = profile.queries.useUpdateMutation(lab.id, id);
  const remove = profile.queries.useDeleteMutation(lab.id, id);
  const title = item.data?.name ?? capitalised(kind);
  return (
    <SettingsScreen title={title} subtitle={lab.isLead ? 'Packing and estimates read these figures.' : `Read only: leads edit ${kind}s.`} testID={`settings-${kind}-edit`}>
      <ProfileBack href={listPath(kind)} label={`All ${kind}s`} />
      {item.isPending ? (
        <LoadingState />
      ) : item.isError ? (
        <ErrorState error={item.error} onRetry={() => item.refetch()} />
      ) : (
        <ProfileForm<P>
          key={item.data.updatedAt}
          groups={profile.groups}
          schema={profile.schema}
          initial={valuesFrom(profile.groups, item.data)}
          readOnly={!lab.isLead}
          submitLabel="Save changes"
          testIDPrefix={kind}
          submitting={update.isPending}
          serverError={update.error}
          onSubmit={(input) => update.mutate(profileFields(input))}
          footer={
            lab.isLead ? (
              <DeleteProfile
                what={`${kind} “${item.data.name}”`}
                testID={`${kind}-delete`}
                pending={remove.isPending}
                error={remove.error}
                saved={update.isSuccess && !update.isPending}
                onDelete={() => remove.mutate(undefined, { onSuccess: () => router.replace(listPath(kind)) })}
              />
            ) : null
          }
        />
      )}
    </SettingsScreen>
  );
}
