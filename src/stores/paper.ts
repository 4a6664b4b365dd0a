import { defineStore } from 'pinia';
import { reactive } from 'vue';
import { describeError, download, fileNamePart } from '../services/api';
import { PAPER_COPY_WORDS } from '../words/paper';

/** The paper copy's download, one per job at a time. */
export const usePaperCopyStore = defineStore('paperCopy', () => {
  const downloading = reactive(new Set<string>());

  /** Saves the job's paper copy; answers '' when saved, else why not in a sentence. */
  async function downloadPaperCopy(job: { id: string; name: string; craneFleetNumber: string }): Promise<string> {
    if (downloading.has(job.id)) return '';
    downloading.add(job.id);
    try {
      const name = fileNamePart(`${job.craneFleetNumber} ${job.name}`, `job-${job.id.slice(0, 8)}`);
      await download(`/jobs/${encodeURIComponent(job.id)}/paper.pdf`, `${name}-${PAPER_COPY_WORDS.fileSuffix}`);
      return '';
    } catch (error) {
      return PAPER_COPY_WORDS.failed(describeError(error));
    } finally {
      downloading.delete(job.id);
    }
  }

  return { downloadPaperCopy, isDownloading: (jobId: string) => downloading.has(jobId) };
});
