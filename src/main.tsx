import "./lib/strictCsp";
import { StrictMode } from "react";
import { createRoot } from "react-dom/client";
import "./fonts.css";
import "./index.css";
import { AppProviders } from "./app/providers";

const root = document.getElementById("root");
if (!root) throw new Error("index.html has no #root element.");

createRoot(root).render(
  <StrictMode>
    <AppProviders />
  </StrictMode>,
);
