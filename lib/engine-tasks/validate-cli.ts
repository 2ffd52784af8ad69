// Child-process entry of the upload checks (validate-process.ts starts it): reads the request in its one
// argument (JSON), loads the files through the engine and prints the outcome as JSON on stdout. A separate
// process, so that parsing a large upload never grows the web server's memory.
import { validateModelFiles, validateSignalFile } from './validate-task';
import type { CheckRequest } from './validate-process';

const request = JSON.parse(process.argv[2] ?? '{}') as CheckRequest;
const outcome = request.kind === 'signal' ? validateSignalFile(request.file, request.inputs) : validateModelFiles(request.files);
process.stdout.write(JSON.stringify(outcome));
