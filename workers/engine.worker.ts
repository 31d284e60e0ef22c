/** Browser worker entry: the engine off the main thread. The page wraps it with comlink's `wrap`. */
import { expose } from "comlink";
import { engineApi } from "./engine-api";

expose(engineApi);
