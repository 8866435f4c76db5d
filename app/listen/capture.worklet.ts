// Runs on the audio rendering thread: copies the microphone's 128-sample render quanta into blocks and hands each block,
// with the context frame of its first sample, straight to the detector's Worker. No analysis here, so the audio thread never stalls.
export {};

declare global {
  // The AudioWorkletGlobalScope's names, which TypeScript's DOM library does not describe.
  const sampleRate: number;
  const currentFrame: number;
  function registerProcessor(name: string, processor: new (options?: unknown) => object): void;
  class AudioWorkletProcessor {
    readonly port: MessagePort;
  }
}

// About 21 ms at 48 kHz: few enough messages, small enough that a note's count is never held back long.
const BLOCK = 1024;

class CaptureProcessor extends AudioWorkletProcessor {
  private out: MessagePort | null = null;
  private block = new Float32Array(BLOCK);
  private filled = 0;
  private blockFrame = 0;
  private running = true;

  constructor() {
    super();
    this.port.onmessage = (event: MessageEvent<{ worker?: MessagePort; stop?: true }>) => {
      if (event.data.worker) this.out = event.data.worker;
      if (event.data.stop) this.running = false;
    };
  }

  process(inputs: Float32Array[][]): boolean {
    const channel = inputs[0]?.[0];
    if (!channel || !this.out) return this.running;
    for (let i = 0; i < channel.length; i++) {
      if (this.filled === 0) this.blockFrame = currentFrame + i;
      this.block[this.filled++] = channel[i]!;
      if (this.filled === BLOCK) {
        this.out.postMessage({ samples: this.block, frame: this.blockFrame }, [this.block.buffer]);
        this.block = new Float32Array(BLOCK);
        this.filled = 0;
      }
    }
    return this.running;
  }
}

registerProcessor("fretcall-capture", CaptureProcessor);
