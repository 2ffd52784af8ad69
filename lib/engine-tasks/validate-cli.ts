// Child-process entry of the upload checks (validate-process.ts starts it): reads the request in its one
// argument (JSON), loads the files through the engine (a zip archive is unpacked first, lib/uploads/
// archive.ts) and prints the outcome as JSON on stdout. A separate process, so that parsing a large upload
// never grows the web server's memory.
import { extractArchive } from '../uploads/archive';
import { validateModelFiles, validateSignalFile } from './validate-task';
import type { ArchiveCheck, CheckRequest } from './validate-process';

async function main(): Promise<unknown> {
  const request = JSON.parse(process.argv[2] ?? '{}') as CheckRequest;
  if (request.kind === 'signal') return validateSignalFile(request.file, request.inputs);
  if (request.kind === 'archive') {
    const archive = await extractArchive(request.archive.path, request.archive.name, request.outDir, request.maxBytes);
    const answer: ArchiveCheck = archive.ok
      ? { archive, check: validateModelFiles(archive.members.map((m) => ({ role: m.role, name: m.name, path: m.path }))) }
      : { archive, check: null };
    return answer;
  }
  return validateModelFiles(request.files);
}

void main().then((outcome) => process.stdout.write(JSON.stringify(outcome)));
