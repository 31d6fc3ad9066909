// `kvarbook preview`: the study's report served on the loopback address, run again each time the study file is saved.
import { watch } from 'chokidar';
import { StudyFailure } from '../diagnostics/diagnostic.ts';
import { criteriaStatus } from '../report/html.ts';
import type { RunLimits } from '../study/model.ts';
import { reportStylesheet } from './environment.ts';
import { type PreviewState, previewPage, previewReport, previewUpdate, problemTexts } from './previewPage.ts';
import { openPreviewServer } from './previewServer.ts';
import { readStudyFile } from './readStudy.ts';
import { produceStudy } from './runCommand.ts';
import { type Terminal, unexpectedProblem } from './terminal.ts';

export interface PreviewOptions {
  /** 0: any free port. */
  port: number;
  set: string[];
  typecheck: boolean;
  ceilings?: RunLimits;
}

/** Writes closer together than this are one save: an editor often writes a file in several steps. */
const SAVE_SETTLE_MS = 150;

export async function previewCommand(studyPath: string, options: PreviewOptions, terminal: Terminal): Promise<number> {
  // Refused at once like `run`: the watcher would never see a study that is not there when it starts.
  readStudyFile(studyPath);
  // The texts the runs read, lent to the terminal as `run` does, and kept here to draw the same excerpts on the page.
  const studyTexts = new Map<string, string>();
  const runTerminal: Terminal = {
    ...terminal,
    studyText: (file, text) => {
      studyTexts.set(file, text);
      terminal.studyText(file, text);
    },
  };
  const stylesheet = reportStylesheet();
  let state: PreviewState = { version: 0, title: `Preview of ${studyPath}`, problems: [] };
  const server = await openPreviewServer(options.port, {
    page: (nonce) => previewPage(state, stylesheet, nonce),
    update: () => previewUpdate(state),
  });
  const show = (next: Omit<PreviewState, 'version'>) => {
    state = { ...next, version: state.version + 1 };
    server.send(previewUpdate(state));
  };

  const runOnce = async (signal: AbortSignal): Promise<void> => {
    try {
      const product = await produceStudy(studyPath, { ...options, signal }, runTerminal);
      if (signal.aborted) return;
      const { meta } = product.run.study;
      const criteria = product.results.criteria;
      show({ title: `Preview: ${meta.title} (${meta.id} rev ${meta.revision})`, report: previewReport(product.report), problems: [] });
      terminal.progressDone();
      terminal.say(`updated; criteria: ${criteriaStatus(criteria.filter((criterion) => !criterion.passed).length, criteria.length)}`);
    } catch (error) {
      // A superseded run fails by design (its child is killed): only the newest run has something to say.
      if (signal.aborted) return;
      const diagnostics = error instanceof StudyFailure ? error.diagnostics : [unexpectedProblem(error)];
      // The last good report stays; only the panel above it changes.
      show({ ...state, problems: problemTexts(diagnostics, studyTexts) });
      terminal.problems(diagnostics);
    }
  };

  // One run at a time, in the order of the saves; a newer save ends the run in progress and any still waiting.
  let runs = Promise.resolve();
  let latest: AbortController | undefined;
  const startRun = () => {
    latest?.abort();
    const controller = new AbortController();
    latest = controller;
    runs = runs.then(() => (controller.signal.aborted ? undefined : runOnce(controller.signal)));
  };
  let settling: NodeJS.Timeout | undefined;
  const saved = () => {
    clearTimeout(settling);
    settling = setTimeout(startRun, SAVE_SETTLE_MS);
  };

  // Editors that save by writing a new file and renaming it over the study are seen as a change (or an add after an unlink).
  const watcher = watch(studyPath, { ignoreInitial: true });
  watcher.on('change', saved);
  watcher.on('add', saved);
  watcher.on('error', (error) => {
    const diagnostics = [
      {
        code: 'preview-watch-failed' as const,
        message: `saves of ${studyPath} can no longer be seen: ${(error as Error).message}`,
        hint: 'stop the preview with Ctrl-C and start it again; on Linux, a full inotify watch limit is a common cause',
      },
    ];
    show({ ...state, problems: problemTexts(diagnostics, studyTexts) });
    terminal.problems(diagnostics);
  });
  await new Promise<void>((resolve) => watcher.once('ready', () => resolve()));
  startRun();
  terminal.say(`preview: ${server.url} (Ctrl-C stops it)`);

  await new Promise<void>((resolve) => {
    const stop = () => {
      process.off('SIGINT', stop);
      process.off('SIGTERM', stop);
      resolve();
    };
    process.on('SIGINT', stop);
    process.on('SIGTERM', stop);
  });
  clearTimeout(settling);
  latest?.abort();
  await watcher.close();
  await server.close();
  // The run in progress ends at once: its calculation process was killed by the abort.
  await runs;
  terminal.progressDone();
  terminal.say('preview stopped');
  return 0;
}
