import { View } from 'react-native';
import { Button } from '@/components/ui/Button';
import { Text } from '@/components/ui/Text';
import { describeError } from '@/lib/api/client';
import { useDownloadRevisionFile, type RevisionFile } from '@/lib/queries/files';
import { useTheme } from '@/lib/theme';

function slug(s: string) {
  return (
    s
      .toLowerCase()
      .replace(/[^a-z0-9]+/g, '-')
      .replace(/^-|-$/g, '') || 'design'
  );
}

/** The margin report and the exports of one revision. */
export function DownloadButtons({
  revisionId,
  designName,
  sequence,
  compact = true,
}: {
  revisionId: string;
  designName: string;
  sequence: number;
  compact?: boolean;
}) {
  const theme = useTheme();
  const download = useDownloadRevisionFile();
  const get = (file: RevisionFile) =>
    download.mutate({ revisionId, file, filename: `${slug(designName)}-r${sequence}-${file.replace('.', '.')}` });
  return (
    <View style={{ gap: 4 }}>
      <View style={{ flexDirection: 'row', flexWrap: 'wrap', gap: theme.space.s }}>
        <Button
          compact={compact}
          icon="download"
          label="Margin report (PDF)"
          onPress={() => get('report.pdf')}
          busy={download.isPending && download.variables?.file === 'report.pdf'}
          testID={`download-pdf-${sequence}`}
        />
        <Button
          compact={compact}
          icon="download"
          label="Waveforms (CSV)"
          variant="quiet"
          onPress={() => get('waveforms.csv')}
          busy={download.isPending && download.variables?.file === 'waveforms.csv'}
          testID={`download-csv-${sequence}`}
        />
        <Button
          compact={compact}
          icon="download"
          label="Export (JSON)"
          variant="quiet"
          onPress={() => get('export.json')}
          busy={download.isPending && download.variables?.file === 'export.json'}
          testID={`download-json-${sequence}`}
        />
      </View>
      {download.isError ? (
        <Text variant="caption" color={theme.color.status.fail}>
          {describeError(download.error)}
        </Text>
      ) : null}
    </View>
  );
}
