/**
 * A file the user picked or dropped, ready to go into a multipart body. On the
 * web it is the browser's File; elsewhere the picker's local URI, which React
 * Native's FormData streams from disk.
 */
export type PickedFile = {
  name: string;
  sizeBytes: number | null;
  body: Blob | { uri: string; name: string; type: string };
};

export type FileDropProps = {
  onFiles: (files: PickedFile[]) => void;
  disabled?: boolean;
  /** File name endings accepted, with the dot: ['.stl', '.obj', '.3mf']. */
  accept: string[];
  testID?: string;
  /** Shown under the prompt, e.g. the accepted formats and the size limit. */
  hint?: string;
};
