import type { RunDetail } from '../../../../shared/schemas/runs';
import { PhotoPanel } from '../../../components/ui/photo-panel';
import { useRole } from '../../../lib/session';
import { useUploadRunPhoto } from '../api/use-upload-run-photo';

export function RunPhotos({ run }: { run: RunDetail }) {
  const { can } = useRole();
  const upload = useUploadRunPhoto(run.id);
  return (
    <PhotoPanel
      title="Photos of the run"
      subject={`run ${run.code}`}
      photos={run.photos}
      canUpload={can('technician')}
      upload={(data) => upload.mutateAsync(data)}
      uploading={upload.isPending}
    />
  );
}
