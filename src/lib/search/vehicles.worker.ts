// The palette's vehicle index, off the main thread: parsing and indexing 100,000 vehicles takes seconds and a search
// over them up to tens of milliseconds, either of which would freeze the console if the page did it. Answers go back
// over the BroadcastChannel the page named this worker after (see spawnVehicleWorker for why not postMessage).
// Typed with the DOM's lib like the rest of src/: adding the webworker lib to the one program clashes with it.
import { vehicleService, type VehicleRequest } from './vehicles';

const replies = new BroadcastChannel(self.name);
const handle = vehicleService((reply) => replies.postMessage(reply));
self.addEventListener('message', (event) => handle(event.data as VehicleRequest));
