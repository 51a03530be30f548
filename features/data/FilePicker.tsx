/**
 * Choosing files in the browser: a button that opens the system file dialog (an <input type=file
 * multiple> on the web, which react-native-web renders as is). Files are read as UTF-8 text here;
 * a file too large for the upload is not read at all, and says so.
 */
import { useRef } from 'react';
import { Platform, View } from 'react-native';
import { MAX_FILE_BYTES } from '../../shared/data';
import { Button } from '../ui/Button';
import { Text } from '../ui/Text';

export interface PickedFile {
  name: string;
  content: string;
  bytes: number;
  /** Set when the file was too large to read. */
  tooLarge: boolean;
}

async function readPicked(file: File): Promise<PickedFile> {
  if (file.size > MAX_FILE_BYTES) return { name: file.name, content: '', bytes: file.size, tooLarge: true };
  return { name: file.name, content: await file.text(), bytes: file.size, tooLarge: false };
}

export function FilePicker({ label, onFiles, disabled }: { label: string; onFiles: (files: PickedFile[]) => void; disabled?: boolean }) {
  const input = useRef<HTMLInputElement | null>(null);
  if (Platform.OS !== 'web') {
    return <Text variant="muted">Choosing files works in the web app; here, paste the CSV text instead.</Text>;
  }
  return (
    <View>
      <Button label={label} icon="plus" onPress={() => input.current?.click()} disabled={disabled} testID="choose-files" />
      <input
        ref={input}
        type="file"
        multiple
        accept=".csv,.tsv,.txt,text/csv,text/plain"
        aria-label={label}
        data-testid="file-input"
        style={{ display: 'none' }}
        onChange={(e) => {
          const target = e.currentTarget;
          const files = Array.from(target.files ?? []);
          void Promise.all(files.map(readPicked)).then((picked) => {
            onFiles(picked);
            target.value = '';
          });
        }}
      />
    </View>
  );
}
