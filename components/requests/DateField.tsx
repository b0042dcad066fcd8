import { Field } from '../ui';

export type DateFieldProps = {
  label: string;
  value: string;
  onChange: (isoDate: string) => void;
  error?: string | null;
  testID?: string;
  min?: string;
};

/** A calendar date typed as YYYY-MM-DD (the web build uses the browser's date picker instead). */
export function DateField({ label, value, onChange, error, testID }: DateFieldProps) {
  return <Field label={label} unit="YYYY-MM-DD" testID={testID} value={value} onChangeText={onChange} error={error} autoCapitalize="none" mono />;
}
