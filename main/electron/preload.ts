/**
 * The narrow bridge between the sandboxed renderer and the main process: one function per API
 * operation, nothing else (no ipcRenderer, no Node).
 */
import { contextBridge, ipcRenderer } from 'electron';
import { OPERATIONS } from '../../app/api-contract.ts';

const bridge = Object.fromEntries(OPERATIONS.map((op) => [op, (arg?: unknown) => ipcRenderer.invoke(`veil:${op}`, arg)]));
contextBridge.exposeInMainWorld('veil', bridge);
