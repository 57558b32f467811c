import "server-only";
export { addPhoto, getPhotoFile, readUpload, removePhoto, stages } from "./photos";
export { processPhoto, MAX_PHOTO_BYTES, MAX_PHOTO_PIXELS } from "./process";
export { sniff } from "./sniff";
export { photoStorage, DiskStorage, type PhotoStorage } from "./storage";
