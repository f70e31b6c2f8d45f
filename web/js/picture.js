// @ts-check
// The picture as a view: the video element showing the footage, the playback controls under it
// (play, frame steps, scrub bar, clock, speed), and the footage's own frame rate measured while it
// plays. Without footage, Play steps through the tracks at the plan's frame rate.

import { byId, el, clockText } from "./dom.js";

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./messages.js").Messages} Messages */
/** A frame the video element showed: its time in the footage, and how many it had shown. @typedef {{mediaTime: number, presentedFrames: number}} Shown */

/**
 * Whether the browser tells when each video frame is shown (requestVideoFrameCallback).
 * @param {HTMLVideoElement} video
 */
function hasFrameCallbacks(video) {
  return "requestVideoFrameCallback" in video;
}

export class Picture {
  /**
   * @param {PageStore} store
   * @param {Messages} messages
   */
  constructor(store, messages) {
    this.store = store;
    this.messages = messages;
    this.video = byId("video", HTMLVideoElement);
    this.playButton = byId("play", HTMLButtonElement);
    this.scrub = byId("scrub", HTMLInputElement);
    this.speed = byId("speed", HTMLSelectElement);
    this.clock = byId("clock", HTMLOutputElement);
    this.playing = false;
    /** @type {ReturnType<typeof setInterval> | undefined} */
    this.timer = undefined;
    /** @type {number[]} seconds between frames shown one after another while playing */
    this.fpsSamples = [];
    /** @type {Shown | null} */
    this.lastVideoFrame = null;
    store.subscribe(["footage"], () => this.open());
    store.subscribe(["frame", "plan", "video", "detections"], () => this.showPosition());
    // The frame rate corrected: the picture shown is the same moment, so its frame number follows
    // (a newcomer's re-trial: "frame 151 · 0:15.00" for the picture at 6.05 s).
    this.fpsShown = store.fps;
    store.subscribe(["plan"], () => {
      if (store.fps === this.fpsShown) return;
      this.fpsShown = store.fps;
      if (store.video.playable && this.video.paused) this.store.frameChosen(Math.round(this.video.currentTime * store.fps + 0.5));
    });
    this.listen();
  }

  /** Wires the video element and the playback controls. */
  listen() {
    const video = this.video;
    video.addEventListener("loadedmetadata", () => this.ready());
    video.addEventListener("error", () => this.failed());
    video.addEventListener("ended", () => this.pause());
    if (hasFrameCallbacks(video)) video.requestVideoFrameCallback((_now, meta) => this.onVideoFrame(meta));
    else video.addEventListener("timeupdate", () => this.onVideoFrame({ mediaTime: video.currentTime, presentedFrames: 0 }));
    this.playButton.addEventListener("click", () => this.play());
    byId("step-back", HTMLButtonElement).addEventListener("click", () => { this.pause(); this.seekFrame(this.store.frame - 1); });
    byId("step-forward", HTMLButtonElement).addEventListener("click", () => { this.pause(); this.seekFrame(this.store.frame + 1); });
    this.scrub.addEventListener("input", () => { this.pause(); this.seekFrame(Number(this.scrub.value)); });
    this.speed.addEventListener("change", () => { if (this.store.video.playable) video.playbackRate = Number(this.speed.value); });
  }

  /** The footage opened: the video element plays it from now on. */
  open() {
    const footage = this.store.footage;
    if (!footage) return;
    this.fpsSamples = [];
    if (this.video.src) URL.revokeObjectURL(this.video.src);
    this.video.src = URL.createObjectURL(footage.blob);
  }

  ready() {
    const v = this.video;
    // Sound alone (or a picture the browser cannot size) has nothing to draw on or count in.
    if (!(v.videoWidth > 0 && v.videoHeight > 0)) return this.noPicture();
    this.store.videoReady(v.videoWidth, v.videoHeight, v.duration);
    this.seekFrame(1);
  }

  failed() {
    this.store.videoFailed();
    const name = this.store.footage ? this.store.footage.name : "the footage";
    const stem = name.replace(/\.[^.]+$/, "");
    const error = this.video.error;
    // WebM and MP4 play in every current browser: one that does not is damaged (cut short by an
    // interrupted copy) or coded in a way browsers do not play (a newcomer's trial: a cut MP4
    // was said to be of a format the browser does not play).
    const playable = /\.(webm|mp4|m4v|mov)$/i.test(name);
    const why = error && error.code === 4
      ? (playable ? "the file may be damaged or cut short (an interrupted copy: copy it again), or its video is coded in a way browsers do not play (HEVC, from some phones and cameras)" : "this browser does not play its video format")
      : "the file could not be read";
    // The footage that played before goes on (a newcomer's re-trial: an AVI opened over it left
    // the picture black and the work "made with other files").
    const before = this.store.footageBefore;
    const kept = before ? `\n${before.name} stays open.` : "";
    this.messages.say("footage", "error", `This browser cannot play ${name}: ${why}. Browsers play WebM and MP4 video (from most cameras and phones). To convert it on this computer, the free program ffmpeg can do it with this command:\n`, [
      el("code", { text: `ffmpeg -i "${name}" -c:v libvpx-vp9 -crf 32 -b:v 0 -an "${stem}.webm"` }),
      document.createTextNode(kept),
    ]);
    if (before) this.store.footageOpened(before.name, before.blob);
  }

  /** The footage plays but shows nothing: sound only, most likely. */
  noPicture() {
    this.store.videoFailed();
    const name = this.store.footage ? this.store.footage.name : "the footage";
    this.messages.say("footage", "error", `${name} has no picture (sound only?): open the video itself, as WebM or MP4. The detections and plan stay as they were.`);
  }

  /** The clock and the scrub bar show the frame on screen. */
  showPosition() {
    const { frame, fps } = this.store;
    this.scrub.max = String(this.store.lastFrame);
    this.clock.textContent = `frame ${frame} · ${clockText((frame - 1) / fps)}`;
    this.scrub.value = String(frame);
  }

  /**
   * The middle of frame f (1-based), which is on screen from (f - 1) / fps to f / fps seconds.
   * @param {number} f
   */
  frameTime(f) {
    return (f - 0.5) / this.store.fps;
  }

  /**
   * Shows frame f.
   * @param {number} f
   */
  seekFrame(f) {
    this.store.frameChosen(f);
    if (this.store.video.playable) this.video.currentTime = this.frameTime(this.store.frame);
  }

  /** @param {Shown} meta */
  onVideoFrame(meta) {
    // While a seek is still under way, a frame presented now belongs to an earlier position: keep
    // the frame the user asked for until the seek is done.
    if (this.store.video.playable && !this.video.seeking) {
      this.measureFrameRate(meta);
      this.store.framePlayed(Math.round(meta.mediaTime * this.store.fps) + 1);
    }
    if (hasFrameCallbacks(this.video)) this.video.requestVideoFrameCallback((_now, m) => this.onVideoFrame(m));
  }

  /**
   * The footage's own frame rate, from the time between frames shown one after another.
   * @param {Shown} meta
   */
  measureFrameRate(meta) {
    const last = this.lastVideoFrame;
    this.lastVideoFrame = meta;
    if (!this.playing || !last || meta.presentedFrames !== last.presentedFrames + 1) return;
    const dt = meta.mediaTime - last.mediaTime;
    if (dt <= 0) return;
    this.fpsSamples.push(dt);
    if (this.fpsSamples.length !== 24) return;
    const sorted = [...this.fpsSamples].sort((a, b) => a - b);
    this.store.frameRateMeasured(1 / sorted[sorted.length >> 1], "plays at");
  }

  /** Plays, or pauses when playing. */
  play() {
    if (this.playing) return this.pause();
    this.playing = true;
    this.playButton.textContent = "Pause";
    if (this.store.video.playable) {
      this.video.playbackRate = Number(this.speed.value);
      this.video.play().catch((e) => this.messages.say("play", "error", `The footage would not play: ${e.message}`));
    } else {
      // No footage: step through the tracks at the plan's frame rate.
      this.timer = setInterval(() => {
        if (this.store.frame >= this.store.lastFrame) return this.pause();
        this.store.framePlayed(this.store.frame + 1);
      }, 1000 / (this.store.fps * Number(this.speed.value)));
    }
  }

  pause() {
    this.playing = false;
    this.playButton.textContent = "Play";
    if (this.store.video.playable) this.video.pause();
    clearInterval(this.timer);
  }

  /**
   * Shows frame f and resolves once the browser has presented it: the next video frame callback after
   * the seek starts (drawing on "seeked" can give the frame before). A seek to the frame already shown
   * presents nothing new, so "seeked" plus a short wait also ends it.
   * @param {number} f
   * @returns {Promise<void>}
   */
  presentFrame(f) {
    const video = this.video;
    return new Promise((resolve) => {
      let done = false;
      const finish = () => { if (!done) { done = true; resolve(); } };
      if (hasFrameCallbacks(video)) video.requestVideoFrameCallback(finish);
      video.addEventListener("seeked", () => setTimeout(finish, hasFrameCallbacks(video) ? 300 : 0), { once: true });
      video.currentTime = this.frameTime(f);
    });
  }
}
